import { isRouteErrorResponse, Link, useRouteError } from "react-router-dom";

export function NotFoundPage() {
  return (
    <div className="mx-auto max-w-xl px-4 py-16">
      <p className="label-caps">404</p>
      <h1 className="mt-1 text-2xl font-semibold">There is no page here</h1>
      <p className="mt-3 text-ink-soft">The address may be mistyped, or the page was moved.</p>
      <p className="mt-6">
        <Link to="/" className="font-medium text-accent underline underline-offset-4">
          Back to the progress site
        </Link>
      </p>
    </div>
  );
}

export function RouteErrorPage() {
  const err = useRouteError();
  const message = isRouteErrorResponse(err) ? `${err.status} ${err.statusText}` : err instanceof Error ? err.message : "Unknown error";
  return (
    <div role="alert" className="mx-auto max-w-xl px-4 py-16">
      <p className="label-caps">Something went wrong</p>
      <h1 className="mt-1 text-2xl font-semibold">This page could not be shown</h1>
      <p className="mt-3 text-ink-soft">{message}</p>
      <p className="mt-6 flex gap-4">
        <button type="button" className="font-medium text-accent underline underline-offset-4" onClick={() => window.location.reload()}>
          Try again
        </button>
        <Link to="/" className="underline underline-offset-4">
          Progress site
        </Link>
      </p>
    </div>
  );
}
