const ORIGIN = "https://plumbline.invalid";
// C0 controls and DEL: browsers drop tabs and newlines from URLs, so "/\t/evil" would become "//evil".
const CONTROL = /[\u0000-\u001f\u007f]/;

/** Spells the same path with its percent-escapes undone (twice-escaped too), or null when malformed. */
function decoded(path: string): string[] | null {
  const forms = [path];
  let current = path;
  for (let i = 0; i < 3 && current.includes("%"); i++) {
    try {
      current = decodeURIComponent(current);
    } catch {
      return null;
    }
    forms.push(current);
  }
  return forms;
}

/**
 * The address to go to after sign-in, if it is a path on this site; otherwise null.
 * Accepted: a single leading "/" followed by neither "/" nor "\" (which browsers read as
 * another host), no control characters, no backslash, and the same in every decoded spelling
 * ("/%2F", "/%5C", "/%252F"). Schemes ("https:", "javascript:") never start with "/".
 */
export function safeReturnAddress(next: string | null | undefined): string | null {
  if (!next || next.length > 2000 || !next.startsWith("/")) return null;
  const forms = decoded(next);
  if (!forms) return null;
  for (const f of forms) {
    if (f.startsWith("//") || f.startsWith("/\\") || f.includes("\\") || CONTROL.test(f)) return null;
  }
  try {
    if (new URL(next, ORIGIN).origin !== ORIGIN) return null;
  } catch {
    return null;
  }
  return next;
}
