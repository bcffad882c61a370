import { createBrowserRouter, Navigate } from 'react-router-dom';
import { RouteError } from './routes/route-error.tsx';

/** Routes load their module on first visit (code splitting); each has its own error boundary. */
export const router = createBrowserRouter([
  { path: '/', lazy: () => import('./routes/home.tsx'), errorElement: <RouteError /> },
  { path: '/sign-in', lazy: () => import('./routes/sign-in.tsx') },
  { path: '/invite/:token', lazy: () => import('./routes/invite.tsx') },
  { path: '/forgot-password', lazy: () => import('./routes/forgot-password.tsx') },
  { path: '/reset-password', lazy: () => import('./routes/reset-password.tsx') },
  { path: '/account', lazy: () => import('./routes/account.tsx') },
  { path: '/account/tokens', lazy: () => import('./routes/account-tokens.tsx') },
  // Full screen, without the lab's frame: the display beside the launcher.
  { path: '/labs/:labId/campaigns/:campaignId/bench', lazy: () => import('./routes/lab-campaign-bench.tsx'), errorElement: <RouteError /> },
  {
    path: '/labs/:labId',
    lazy: () => import('./routes/lab.tsx'),
    children: [
      { index: true, element: <Navigate to="campaigns" replace /> },
      { path: 'campaigns', lazy: () => import('./routes/lab-campaigns.tsx') },
      { path: 'campaigns/:campaignId', lazy: () => import('./routes/lab-campaign.tsx') },
      { path: 'shots/:shotId', lazy: () => import('./routes/lab-shot.tsx') },
      { path: 'campaigns/:campaignId/trends', lazy: () => import('./routes/lab-campaign-trends.tsx') },
      { path: 'campaigns/:campaignId/batch', lazy: () => import('./routes/lab-campaign-batch.tsx') },
      { path: 'batches/:batchId', lazy: () => import('./routes/lab-batch.tsx') },
      { path: 'review-queue', lazy: () => import('./routes/lab-review-queue.tsx') },
      { path: 'compare', lazy: () => import('./routes/lab-compare.tsx') },
      { path: 'library', lazy: () => import('./routes/lab-library.tsx') },
      { path: 'people', lazy: () => import('./routes/lab-people.tsx') },
      { path: 'audit', lazy: () => import('./routes/lab-audit.tsx') },
      { path: 'outbox', lazy: () => import('./routes/lab-outbox.tsx') },
    ],
  },
  { path: '*', lazy: () => import('./routes/not-found.tsx') },
]);
