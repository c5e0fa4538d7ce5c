/** The operator's site rules, shown before anyone asks to visit. */
export function VisitRules() {
  return (
    <aside aria-labelledby="site-rules-h" className="border-2 border-ink bg-sheet p-4" data-testid="site-rules">
      <h2 id="site-rules-h" className="flex items-center gap-2 font-semibold">
        <span aria-hidden className="flex size-6 items-center justify-center border-2 border-ink text-sm font-bold">
          !
        </span>
        Site rules for visitors
      </h2>
      <p className="mt-2 text-sm font-medium">A construction site is hazardous: moving plant, open excavations, work at height and live electrical equipment can hurt people.</p>
      <p className="mt-2 text-sm text-ink-soft">Every visitor, every visit:</p>
      <ul className="mt-1 list-disc space-y-1 pl-5 text-sm">
        <li>takes the site induction before going past the gate;</li>
        <li>wears the personal protective equipment issued: hard hat, high-visibility vest, safety boots and eye protection;</li>
        <li>is escorted by site staff at all times, and keeps out of plant rooms and live areas;</li>
        <li>takes no photographs without permission: the site's layout and security are sensitive.</li>
      </ul>
    </aside>
  );
}
