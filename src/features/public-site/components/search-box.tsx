import type { FormEvent } from "react";
import { Button } from "../../../components/ui/button.tsx";

/** A labelled search field and its button, as one search form (the updates list and the project search). */
export function SearchBox({ id, label, value, onChange, onSubmit, placeholder, className = "" }: { id: string; label: string; value: string; onChange: (value: string) => void; onSubmit: (e: FormEvent) => void; placeholder: string; className?: string }) {
  return (
    // A plain GET form too (`?q=`): it works before the page's scripts have taken over a
    // server-rendered page (decision 059), and without them.
    <form role="search" method="get" onSubmit={onSubmit} className={`flex min-w-0 items-end gap-2 ${className}`}>
      <div className="flex min-w-0 flex-1 flex-col gap-1">
        <label htmlFor={id} className="text-sm font-medium">
          {label}
        </label>
        <input
          id={id}
          type="search"
          name="q"
          value={value}
          onChange={(e) => onChange(e.target.value)}
          placeholder={placeholder}
          maxLength={200}
          className="min-h-10 w-full rounded-sm border border-rule-strong bg-sheet px-3 py-2 text-base placeholder:text-ink-faint focus:border-ink"
        />
      </div>
      <Button type="submit">Search</Button>
    </form>
  );
}
