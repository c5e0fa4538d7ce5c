import type { MediaStatus, Sensitivity } from "#shared/schemas/media.ts";
import { SENSITIVITY_WORD, STATUS_WORD } from "../words.ts";

/** A state as glyph and word in its tone, so it never rests on colour alone. */
function Mark({ look, ...data }: { look: { glyph: string; word: string; tone: string } } & Record<`data-${string}`, string>) {
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap text-xs font-medium ${look.tone}`} {...data}>
      <span aria-hidden>{look.glyph}</span>
      {look.word}
    </span>
  );
}

export function StatusWord({ status }: { status: MediaStatus }) {
  return <Mark look={STATUS_WORD[status]} data-status={status} />;
}

export function SensitivityWord({ sensitivity }: { sensitivity: Sensitivity }) {
  return <Mark look={SENSITIVITY_WORD[sensitivity]} data-sensitivity={sensitivity} />;
}

/** Photos tagged with the security system wait for a lead before anything else happens. */
export function SecurityFlag() {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap border border-bad px-1 text-xs font-semibold text-bad" data-flag="security">
      <span aria-hidden>▲</span>
      Security review
    </span>
  );
}

export function MissingAlt() {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap text-xs font-medium text-watch" data-flag="missing-alt">
      <span aria-hidden>!</span>
      No alt text
    </span>
  );
}
