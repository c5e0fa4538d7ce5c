import { useState } from "react";
import { TextField } from "./field.tsx";

/** How many minor units a currency has in one major unit (100 for GBP, 1 for JPY). */
export function minorPerMajor(currency: string): number {
  try {
    return 10 ** (new Intl.NumberFormat("en-GB", { style: "currency", currency }).resolvedOptions().maximumFractionDigits ?? 2);
  } catch {
    return 100;
  }
}

/** Text typed in major units ("12,500.50", "-3000") → integer minor units, or null when empty or not a number. */
export function parseMoney(text: string, currency: string): number | null {
  const cleaned = text.replace(/[,\s£$€]/g, "").replace(/^−/, "-");
  if (cleaned === "" || !/^-?\d*(\.\d*)?$/.test(cleaned)) return null;
  return Math.round(Number(cleaned) * minorPerMajor(currency));
}

function display(minor: number | null, currency: string): string {
  return minor === null ? "" : String(minor / minorPerMajor(currency));
}

/**
 * An amount of money typed in major units of the project's currency and held as integer minor
 * units (the API's unit), so nobody types pence. `signed` allows a minus (a saving).
 */
export function MoneyField({ label, value, onChange, currency, error, hint, signed = false }: { label: string; value: number | null; onChange: (minor: number | null) => void; currency: string; error?: string; hint?: string; signed?: boolean }) {
  const [text, setText] = useState(display(value, currency));
  return (
    <TextField
      label={`${label} (${currency})`}
      inputMode={signed ? "text" : "decimal"}
      value={text}
      hint={hint}
      error={error}
      onChange={(e) => {
        setText(e.target.value);
        onChange(parseMoney(e.target.value, currency));
      }}
    />
  );
}
