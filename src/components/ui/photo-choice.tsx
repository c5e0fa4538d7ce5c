import { Picture, type PictureData } from "./picture.tsx";

export interface PhotoChoice {
  picture: PictureData;
  /** What the photo shows (its alt text or caption), read out as the button's name. */
  title: string;
  /** Short facts under the photo: "No alt text", "Unreviewed", "Hall 2A". */
  notes: Array<{ text: string; warn?: boolean }>;
}

/** A grid of library photos to choose from; each is a button named by what it shows. */
export function PhotoChoiceGrid({ choices, onChoose, selectedIds = [] }: { choices: readonly PhotoChoice[]; onChoose: (id: number) => void; selectedIds?: readonly number[] }) {
  if (choices.length === 0) return <p className="py-6 text-center text-ink-soft">No photo matches.</p>;
  return (
    <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 md:grid-cols-4">
      {choices.map((c) => {
        const selected = selectedIds.includes(c.picture.id);
        return (
          <li key={c.picture.id}>
            <button
              type="button"
              onClick={() => onChoose(c.picture.id)}
              aria-pressed={selected || undefined}
              className={`block w-full border-2 bg-sheet text-left hover:border-ink ${selected ? "border-accent" : "border-rule"}`}
              data-testid="photo-choice"
              data-media-id={c.picture.id}
            >
              <Picture picture={c.picture} alt="" fit="cover" aspect={4 / 3} sizes="12rem" />
              <span className="block px-2 pt-1.5 text-xs font-medium leading-snug">
                {selected ? <span aria-hidden>✓ </span> : null}
                {c.title}
              </span>
              <span className="flex flex-wrap gap-1 px-2 pb-2 pt-1">
                {c.notes.map((n) => (
                  <span key={n.text} className={`border px-1 text-[0.7rem] ${n.warn ? "border-bad text-bad" : "border-rule text-ink-soft"}`}>
                    {n.warn ? <span aria-hidden>▲ </span> : null}
                    {n.text}
                  </span>
                ))}
              </span>
            </button>
          </li>
        );
      })}
    </ul>
  );
}
