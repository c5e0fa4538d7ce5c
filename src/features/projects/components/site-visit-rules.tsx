/** The operator's rules for visits, shown wherever visits are offered. */
export function SiteVisitRules() {
  return (
    <aside aria-labelledby="visit-rules" className="border-2 border-ink bg-sheet p-4">
      <h2 id="visit-rules" className="flex items-center gap-2 font-semibold">
        <span aria-hidden className="flex size-6 items-center justify-center border-2 border-ink text-sm font-bold">
          !
        </span>
        Visiting a construction site
      </h2>
      <p className="mt-2 text-sm text-ink-soft">A live construction site and energised plant can hurt people. Visits follow the site rules:</p>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
        <li>a site induction before entry, every visit;</li>
        <li>personal protective equipment as issued: hard hat, high-visibility vest, safety boots, eye protection;</li>
        <li>escorted by site staff at all times; no entry to plant rooms or live areas;</li>
        <li>no photographs without permission: the site's layout and security are sensitive.</li>
      </ul>
    </aside>
  );
}
