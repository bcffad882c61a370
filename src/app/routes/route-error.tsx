import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { ApiError } from '../../lib/api-client.ts';
import { NotFoundPage } from './not-found.tsx';

/** Each route's error boundary: a failure in one page shows here, the rest of the app keeps working. */
export function RouteError() {
  const error = useRouteError();
  if ((isRouteErrorResponse(error) && error.status === 404) || (error instanceof ApiError && error.status === 404)) {
    return <NotFoundPage message={error instanceof ApiError ? error.message : undefined} />;
  }
  const message = error instanceof Error ? error.message : 'An unexpected error stopped this page.';
  return (
    <div role="alert" className="mx-auto max-w-lg px-6 py-16">
      <h1 className="text-lg font-semibold text-harbour-900">This page could not be shown</h1>
      <p className="mt-2 text-sm text-harbour-700">{message}</p>
      <p className="mt-4 text-sm text-harbour-500">Your data is safe. Reload the page, or go back and try again.</p>
      <div className="mt-6 flex gap-4 text-sm font-medium">
        <button type="button" className="text-harbour-700 underline underline-offset-4" onClick={() => window.location.reload()}>Reload</button>
        <Link to="/" className="text-harbour-700 underline underline-offset-4">Home</Link>
      </div>
    </div>
  );
}
