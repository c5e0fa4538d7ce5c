import { useEffect, useState } from "react";
import { SensitivitySchema, type MediaVocabulary } from "#shared/schemas/media.ts";
import type { System } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { isCalendarDate } from "#shared/domain/calendar.ts";
import { SYSTEM_WORD } from "../../../lib/format.ts";
import type { LibraryFilters } from "../api.ts";
import { SENSITIVITY_WORD } from "../words.ts";

/** The library's filters; every change starts again from the first page. */
export function LibraryFiltersForm({ filters, onChange, vocabulary }: { filters: LibraryFilters; onChange: (f: LibraryFilters) => void; vocabulary: MediaVocabulary }) {
  const set = (change: Partial<LibraryFilters>) => onChange({ ...filters, ...change, page: 1 });
  const any = Object.entries(filters).some(([k, v]) => k !== "page" && v !== undefined && v !== "" && v !== false);
  // The words field keeps what is typed while the library asks for the matching photos (the address follows).
  const [q, setQ] = useState(filters.q ?? "");
  useEffect(() => setQ(filters.q ?? ""), [filters.q]);
  return (
    <form role="search" aria-label="Filter the library" className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4" onSubmit={(e) => e.preventDefault()}>
      <TextField label="Words in name, caption or alt text" type="search" value={q} onChange={(e) => {
          setQ(e.target.value);
          set({ q: e.target.value || undefined });
        }} />
      <SelectField
        label="Area"
        value={filters.area ?? ""}
        onChange={(e) => set({ area: e.target.value || undefined })}
        options={[{ value: "", label: "Any area" }, ...vocabulary.areas.map((a) => ({ value: a, label: a }))]}
      />
      <SelectField
        label="System"
        value={filters.system ?? ""}
        onChange={(e) => set({ system: (e.target.value || undefined) as System | undefined })}
        options={[{ value: "", label: "Any system" }, ...vocabulary.systems.map((s) => ({ value: s, label: SYSTEM_WORD[s] }))]}
      />
      <SelectField
        label="Milestone"
        value={filters.milestone ? String(filters.milestone) : ""}
        onChange={(e) => set({ milestone: e.target.value ? Number(e.target.value) : undefined })}
        options={[{ value: "", label: "Any milestone" }, ...vocabulary.milestones.map((m) => ({ value: String(m.id), label: m.name }))]}
      />
      <DateField label="Taken from" value={filters.takenFrom ?? ""} onChange={(e) => isCalendarDate(e.target.value) || e.target.value === "" ? set({ takenFrom: e.target.value || undefined }) : undefined} />
      <DateField label="Taken to" value={filters.takenTo ?? ""} onChange={(e) => isCalendarDate(e.target.value) || e.target.value === "" ? set({ takenTo: e.target.value || undefined }) : undefined} />
      <SelectField
        label="Sensitivity"
        value={filters.sensitivity ?? ""}
        onChange={(e) => set({ sensitivity: (e.target.value || undefined) as LibraryFilters["sensitivity"] })}
        options={[{ value: "", label: "Any" }, ...SensitivitySchema.options.map((s) => ({ value: s, label: `${SENSITIVITY_WORD[s].glyph} ${SENSITIVITY_WORD[s].word}` }))]}
      />
      <fieldset className="flex flex-col justify-end gap-1">
        <legend className="sr-only">Other filters</legend>
        <label className="inline-flex items-center gap-2 text-sm">
          <input type="checkbox" checked={filters.missingAlt ?? false} onChange={(e) => set({ missingAlt: e.target.checked || undefined })} />
          Missing alt text
        </label>
        <label className="inline-flex items-center gap-2 text-sm">
          <input type="checkbox" checked={filters.flagged ?? false} onChange={(e) => set({ flagged: e.target.checked || undefined })} />
          Flagged for security review
        </label>
      </fieldset>
      {any ? (
        <div className="sm:col-span-2 lg:col-span-4">
          <Button size="sm" variant="ghost" onClick={() => onChange({ page: 1 })}>
            Clear filters
          </Button>
        </div>
      ) : null}
    </form>
  );
}
