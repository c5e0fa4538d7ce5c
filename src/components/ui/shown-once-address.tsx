import { useId, type ReactNode } from "react";
import { Button } from "./button.tsx";

/**
 * A secret address shown once, when it is made (a personal calendar feed, a review link):
 * read-only, selected on focus so it can be copied by hand, with a Copy button; `children` say
 * what to do with it.
 */
export function ShownOnceAddress({ label, url, onCopy, testId, children }: { label: string; url: string; onCopy: () => void; testId?: string; children?: ReactNode }) {
  const id = useId();
  return (
    <div className="mt-3">
      <label htmlFor={id} className="block text-sm font-medium">
        {label}
      </label>
      <div className="mt-1 flex flex-wrap gap-2">
        <input id={id} readOnly value={url} onFocus={(e) => e.currentTarget.select()} className="min-w-0 flex-1 rounded-sm border border-rule-strong bg-sheet px-2 py-1 font-mono text-xs" data-testid={testId} />
        <Button size="sm" onClick={onCopy}>
          Copy
        </Button>
      </div>
      {children}
    </div>
  );
}
