import { isRouteErrorResponse, useRevalidator, useRouteError } from 'react-router';
import { ErrorState } from '@/components/error-state';
import { Wordmark } from '@/components/logo';
import { ApiError } from '@/lib/api-error';
import { NotFound } from './not-found';

/** Errors thrown by a page's loader or render; the shell around it stays usable. */
export function RouteErrorBoundary() {
  const error = useRouteError();
  const revalidator = useRevalidator();

  if (error instanceof ApiError && error.isNotFound) {
    return <NotFound title={error.title} detail={error.detail} />;
  }
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFound />;

  return (
    <div className="py-6">
      <ErrorState error={error} onRetry={() => void revalidator.revalidate()} />
    </div>
  );
}

/** Errors before the shell exists (e.g. the API is down while the session is checked). */
export function RootErrorBoundary() {
  const error = useRouteError();
  return (
    <div className="min-h-dvh bg-paper px-6 py-10">
      <div className="mx-auto max-w-xl">
        <div className="mb-10">
          <Wordmark tone="dark" />
        </div>
        <ErrorState error={error} onRetry={() => window.location.reload()} />
      </div>
    </div>
  );
}
