import type { Dispatch, SetStateAction } from "react";
import { Link } from "react-router-dom";
import { useTitle } from "../../lib/use-title.ts";
import { Button } from "./button.tsx";

/** The head of a site walk (the programme's, the plant's): where it is, and the way back to the tables. */
export function WalkHeader({ sheet, title, back, backLabel }: { sheet: string; title: string; back: string; backLabel: string }) {
  useTitle(title, sheet.split(" · ")[0]);
  return (
    <div className="mb-4 flex items-center justify-between gap-3 border-b-2 border-ink pb-2">
      <div>
        <p className="label-caps">{sheet}</p>
        <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
      </div>
      <Link to={back} className="text-sm underline underline-offset-4">
        {backLabel}
      </Link>
    </div>
  );
}

/** Previous and Skip under a walk's step: large, for a thumb; `index` may run one past the last step (the walk's end). */
export function WalkSteps({ index, count, setIndex }: { index: number; count: number; setIndex: Dispatch<SetStateAction<number>> }) {
  const big = "min-h-12 px-4 text-base";
  return (
    <nav aria-label="Walk steps" className="grid grid-cols-2 gap-2">
      <Button className={big} disabled={index === 0} onClick={() => setIndex((i) => Math.max(0, i - 1))}>
        ← Previous
      </Button>
      <Button className={big} disabled={index >= count} onClick={() => setIndex((i) => Math.min(count, i + 1))}>
        Skip →
      </Button>
    </nav>
  );
}
