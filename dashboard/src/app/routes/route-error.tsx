import { isRouteErrorResponse, useRouteError } from 'react-router';
import { Failure } from '../../components/states';

/** Shown when a screen fails to load (a lost chunk, an API that is down). */
export function RouteError() {
  const error = useRouteError();
  const message = isRouteErrorResponse(error)
    ? new Error(`${error.status} ${error.statusText}`)
    : error;
  return (
    <main className="mx-auto max-w-lg p-6">
      <Failure
        error={message}
        what="This page could not be opened."
        onRetry={() => window.location.reload()}
      />
    </main>
  );
}
