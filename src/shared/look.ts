/**
 * The colours the product shares between the app and what the server draws (e-mails). The app's
 * Tailwind theme (src/index.css `--color-accent`, `--color-ink`) holds the same values, and
 * tests/domain/look.test.ts holds the two together. Orange is for the one primary action of a
 * screen or an e-mail, never for links, tabs or charts (decision 056).
 */
export const ACCENT = "#c2410c";
export const INK = "#1d1f24";
