import { createBrowserRouter, Navigate } from 'react-router-dom';
import { Loading } from '../components/ui/primitives.tsx';

/** Shown while the first page's module loads (React Router's hydrate fallback; without one it warns on every load). */
const loadingPage = <div className="p-8"><Loading what="Opening Gatepost" /></div>;

/**
 * Routes load their module on first visit (code splitting); each module exports its own error boundary
 * (`ErrorBoundary`), so none is set here too: a route given both gets React Router's "defined twice" warning.
 */
export const router = createBrowserRouter([
  { path: '/', lazy: () => import('./routes/home.tsx'), hydrateFallbackElement: loadingPage },
  { path: '/sign-in', lazy: () => import('./routes/sign-in.tsx'), hydrateFallbackElement: loadingPage },
  { path: '/invite/:token', lazy: () => import('./routes/invite.tsx'), hydrateFallbackElement: loadingPage },
  { path: '/forgot-password', lazy: () => import('./routes/forgot-password.tsx'), hydrateFallbackElement: loadingPage },
  { path: '/reset-password', lazy: () => import('./routes/reset-password.tsx'), hydrateFallbackElement: loadingPage },
  { path: '/account', lazy: () => import('./routes/account.tsx'), hydrateFallbackElement: loadingPage },
  { path: '/account/tokens', lazy: () => import('./routes/account-tokens.tsx'), hydrateFallbackElement: loadingPage },
  // Full screen, without the lab's frame: the display beside the launcher.
  { path: '/labs/:labId/campaigns/:campaignId/bench', lazy: () => import('./routes/lab-campaign-bench.tsx'), hydrateFallbackElement: loadingPage },
  {
    path: '/labs/:labId',
    lazy: () => import('./routes/lab.tsx'),
    hydrateFallbackElement: loadingPage,
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
  { path: '*', lazy: () => import('./routes/not-found.tsx'), hydrateFallbackElement: loadingPage },
]);
