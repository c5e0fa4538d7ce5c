import { isRouteErrorResponse, Link, useRouteError } from "react-router-dom";
import { Spinner } from "../../components/ui/sheet.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { useTitle } from "../../lib/use-title.ts";

export function NotFoundPage() {
  useTitle("There is no page here", "Plumbline");
  return (
    <div className="mx-auto max-w-xl px-4 py-16">
      <p className="label-caps">404</p>
      <h1 className="mt-1 text-2xl font-semibold">There is no page here</h1>
      <p className="mt-3 text-ink-soft">The address may be mistyped, or the page was moved.</p>
      <p className="mt-6">
        <Link to="/" className="font-medium text-ink underline underline-offset-4">
          Back to the progress site
        </Link>
      </p>
    </div>
  );
}

/** Shown while the first page's loader primes the cache, before anything else is drawn. */
export function FirstLoad() {
  return (
    <div className="mx-auto max-w-5xl px-4">
      <Spinner />
    </div>
  );
}

/**
 * The error element of every route: what a loader or a page could not read, in words, with a
 * way back. A 404 names what is missing (`what`: "update", "photo story", …); anything else
 * says what went wrong and offers to try again.
 */
export function RouteErrorPage({ what = "page", home = "/", homeLabel = "Progress site" }: { what?: string; home?: string; homeLabel?: string }) {
  const err = useRouteError();
  const missing = (err instanceof ApiError && err.status === 404) || (isRouteErrorResponse(err) && err.status === 404);
  useTitle(missing ? `No such ${what}` : `This ${what} could not be shown`, "Plumbline");
  if (missing) {
    return (
      <div role="alert" className="mx-auto max-w-xl px-4 py-16">
        <p className="label-caps">404</p>
        <h1 className="mt-1 text-2xl font-semibold">No such {what}</h1>
        <p className="mt-3 text-ink-soft">There is no {what} at this address. It may have been withdrawn, or the address is mistyped.</p>
        <p className="mt-6">
          <Link to={home} className="font-medium text-ink underline underline-offset-4">
            Back to the {homeLabel.toLowerCase()}
          </Link>
        </p>
      </div>
    );
  }
  const message = isRouteErrorResponse(err) ? `${err.status} ${err.statusText}` : err instanceof Error ? err.message : "Unknown error";
  return (
    <div role="alert" className="mx-auto max-w-xl px-4 py-16">
      <p className="label-caps">Something went wrong</p>
      <h1 className="mt-1 text-2xl font-semibold">This {what} could not be shown</h1>
      <p className="mt-3 text-ink-soft">{message}</p>
      <p className="mt-6 flex gap-4">
        <button type="button" className="font-medium text-ink underline underline-offset-4" onClick={() => window.location.reload()}>
          Try again
        </button>
        <Link to={home} className="underline underline-offset-4">
          {homeLabel}
        </Link>
      </p>
    </div>
  );
}
