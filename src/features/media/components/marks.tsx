import type { MediaStatus, Sensitivity } from "#shared/schemas/media.ts";
import { SENSITIVITY_WORD, STATUS_WORD } from "../words.ts";

export function StatusWord({ status }: { status: MediaStatus }) {
  const s = STATUS_WORD[status];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap text-xs font-medium ${s.tone}`} data-status={status}>
      <span aria-hidden>{s.glyph}</span>
      {s.word}
    </span>
  );
}

export function SensitivityWord({ sensitivity }: { sensitivity: Sensitivity }) {
  const s = SENSITIVITY_WORD[sensitivity];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap text-xs font-medium ${s.tone}`} data-sensitivity={sensitivity}>
      <span aria-hidden>{s.glyph}</span>
      {s.word}
    </span>
  );
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
