import { Suspense } from "react";
import { Outlet } from "react-router-dom";
import { Spinner } from "../../components/ui/sheet.tsx";

/** The first stop of the keyboard on every page: straight past the header to the page itself. */
export function SkipLink() {
  return (
    <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:bg-sheet focus:p-2">
      Skip to content
    </a>
  );
}

/** Where a layout draws the page the route chose. */
export function PageOutlet() {
  return (
    // A page whose data its loader did not prime (one that follows a choice on the page) waits here.
    <Suspense fallback={<Spinner />}>
      <Outlet />
    </Suspense>
  );
}
