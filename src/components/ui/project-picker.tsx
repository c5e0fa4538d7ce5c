import { SelectField } from "./field.tsx";

/** Which project a site-office page works on; nothing when there is only one. */
export function ProjectPicker({ choices, slug, setSlug, className = "mb-4 w-64" }: { choices: Array<{ value: string; label: string }>; slug: string; setSlug: (s: string) => void; className?: string }) {
  if (choices.length <= 1) return null;
  return (
    <div className={className}>
      <SelectField label="Project" value={slug} onChange={(e) => setSlug(e.target.value)} options={choices} />
    </div>
  );
}
