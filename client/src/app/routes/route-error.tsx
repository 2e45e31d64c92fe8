import { isRouteErrorResponse, Link, useRouteError } from 'react-router';
import { Button } from '@/components/ui/button';
import { isApiError } from '@/lib/api-client';

function describe(error: unknown): { title: string; detail: string } {
  if (isRouteErrorResponse(error)) {
    if (error.status === 404) return { title: 'Page not found', detail: 'There is no screen at this address.' };
    return { title: `The page could not load (${error.status})`, detail: error.statusText || 'The server refused the request.' };
  }
  if (isApiError(error)) {
    if (error.code === 'network_error' || [502, 503, 504].includes(error.status)) {
      return { title: 'The server cannot be reached', detail: 'The server did not answer. Check the connection, then reload.' };
    }
    return { title: 'The page could not load', detail: error.message };
  }
  if (error instanceof Error) return { title: 'Something went wrong on this page', detail: error.message };
  return { title: 'Something went wrong on this page', detail: 'An unexpected error occurred.' };
}

/** The errorElement of every route: says what failed and offers a way on, inside the shell when there is one. */
export function RouteError() {
  const error = useRouteError();
  const { title, detail } = describe(error);
  return (
    <div role="alert" className="m-4 flex max-w-prose flex-col gap-2 rounded border border-border bg-surface p-4">
      <h1 className="text-base font-semibold text-text">{title}</h1>
      <p className="text-sm text-muted">{detail}</p>
      <div className="flex gap-2">
        <Button size="sm" onClick={() => window.location.reload()}>
          Reload
        </Button>
        <Link to="/" className="inline-flex h-7 items-center px-2 text-xs text-link underline underline-offset-2">
          Go to your home screen
        </Link>
      </div>
    </div>
  );
}
