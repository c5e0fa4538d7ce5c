import { encode as qpEncode, wrap as qpWrap } from "nodemailer/lib/qp";

/**
 * Hides the single-use and signed secrets in stored messages before anyone reads them in
 * the outbox: whoever can read another person's reset or invitation link can take over that
 * account, and a subscriber's links let the holder change or end their subscription.
 *
 * The rules key on where a secret sits (the path it follows, the query parameter that carries
 * it), not on how the token is formed, so a change of token format stays hidden. Every rule
 * works on decoded text; the raw message is decoded part by part (quoted-printable soft line
 * breaks split tokens), masked and encoded again.
 */

/** What replaces a secret; never a valid token (brackets are in no token alphabet). */
export const HIDDEN = "[hidden]";

/** Characters a token may hold (base64url, its padding and separators, percent-escapes); ASCII only. */
const T = "A-Za-z0-9\\-._~%+=!$*";

/**
 * Paths whose next segment is a secret: the pages and API routes of password resets,
 * invitations, subscription confirmation, preferences and unsubscribe, and digest web copies.
 */
const TOKEN_PATH = new RegExp(
  `(/(?:reset-password|invitations|password-reset|subscriptions/(?:confirm|preferences|unsubscribe)|u|digests/web)/)([${T}]+)`,
  "g",
);
/** Signed media links: every query value but the expiry. */
const SIGNED_MEDIA = new RegExp(`(/media/s/[${T}]+\\?)((?:(?:&amp;|&)?[A-Za-z0-9_\\-.]+=[${T}]*)+)`, "g");
/** Wherever a URL carries a secret by name. */
const SECRET_PARAM = new RegExp(`([?&;](?:token|sig|signature|key)=)([${T}]+)`, "gi");

function hide(secret: string): string {
  // A long random token keeps a short prefix so an administrator can tell two messages apart.
  return `${secret.length >= 16 ? secret.slice(0, 4) : ""}...${HIDDEN}`;
}

/** Already masked: the rules run again over their own output (views call each other). */
const maskedAt = (s: string, end: number) => s.startsWith(HIDDEN, end);

/** Masks every secret in a piece of decoded text or HTML. */
export function maskSecrets(s: string): string {
  let out = s.replace(TOKEN_PATH, (m: string, path: string, token: string, at: number, all: string) =>
    maskedAt(all, at + m.length) ? m : path + hide(token),
  );
  out = out.replace(SIGNED_MEDIA, (m: string, path: string, query: string, at: number, all: string) => {
    if (maskedAt(all, at + m.length)) return m;
    return (
      path +
      query.replace(new RegExp(`((?:^|&amp;|&)([A-Za-z0-9_\\-.]+)=)([${T}]*)`, "g"), (p: string, key: string, name: string, value: string) =>
        name === "exp" || value === "" ? p : key + hide(value),
      )
    );
  });
  return out.replace(SECRET_PARAM, (m: string, key: string, value: string, at: number, all: string) =>
    maskedAt(all, at + m.length) ? m : key + hide(value),
  );
}

/** RFC 2047 encoded words, decoded to bytes held one per character (latin1), as the masks expect. */
function decodeWords(value: string): string {
  if (!value.includes("=?")) return value;
  return value
    .replace(/(\?=)\s+(=\?)/g, "$1$2")
    .replace(/=\?([^?\s]+)\?([bBqQ])\?([^?\s]*)\?=/g, (_m, _charset: string, enc: string, text: string) =>
      enc.toUpperCase() === "B"
        ? Buffer.from(text, "base64").toString("latin1")
        : text.replace(/_/g, " ").replace(/=([0-9A-Fa-f]{2})/g, (_x, h: string) => String.fromCharCode(parseInt(h, 16))),
    );
}

/** A header value as the outbox shows it: unchanged unless it held a secret (then decoded and masked). */
export function maskHeaderValue(value: string): string {
  const plain = decodeWords(value);
  const masked = maskSecrets(plain);
  return masked === plain ? value : Buffer.from(masked, "latin1").toString("utf8");
}

export function maskHeaders(headers: Record<string, string>): Record<string, string> {
  return Object.fromEntries(Object.entries(headers).map(([k, v]) => [k, maskHeaderValue(v)]));
}

// ---------------------------------------------------------------------------------------
// The raw message: every byte kept except the secrets. Strings hold one byte per character.

interface Field {
  name: string;
  /** the field as received, folding included */
  raw: string;
  /** unfolded value */
  value: string;
}

function parseFields(head: string, eol: string): Field[] {
  const fields: Field[] = [];
  for (const line of head.split(/\r?\n/)) {
    const last = fields[fields.length - 1];
    if (/^[ \t]/.test(line) && last) {
      last.raw += eol + line;
      last.value += ` ${line.trim()}`;
      continue;
    }
    const i = line.indexOf(":");
    fields.push({ name: i > 0 ? line.slice(0, i) : "", raw: line, value: i > 0 ? line.slice(i + 1).trim() : "" });
  }
  return fields;
}

const fieldValue = (fields: Field[], name: string) => fields.find((f) => f.name.trim().toLowerCase() === name)?.value ?? "";

function qpDecode(s: string): string {
  return s.replace(/=[ \t]*\r?\n/g, "").replace(/=([0-9A-Fa-f]{2})/g, (_m, h: string) => String.fromCharCode(parseInt(h, 16)));
}

function maskLeafBody(body: string, encoding: string, eol: string): string {
  const trailing = /(?:\r?\n)*$/.exec(body)![0];
  const content = body.slice(0, body.length - trailing.length);
  if (encoding === "base64") {
    const decoded = Buffer.from(content.replace(/\s+/g, ""), "base64").toString("latin1");
    const masked = maskSecrets(decoded);
    if (masked === decoded) return body;
    const b64 = Buffer.from(masked, "latin1").toString("base64");
    return (b64.match(/.{1,76}/g) ?? []).join(eol) + trailing;
  }
  if (encoding === "quoted-printable") {
    const decoded = qpDecode(content);
    const masked = maskSecrets(decoded);
    if (masked === decoded) return body;
    return qpWrap(qpEncode(Buffer.from(masked, "latin1")), 76).replace(/\r?\n/g, eol) + trailing;
  }
  // 7bit, 8bit, binary: the text is as sent; the mask is shorter ASCII, so line limits hold.
  return maskSecrets(body);
}

function maskMultipart(body: string, boundary: string): string {
  const open = `--${boundary}`;
  const close = `--${boundary}--`;
  const out: string[] = [];
  let part: string[] | null = null;
  let closed = false;
  const flush = () => {
    if (!part) return;
    const text = part.join("");
    // The line break before a delimiter belongs to the delimiter (RFC 2046 §5.1.1).
    const eol = /\r?\n$/.exec(text)?.[0] ?? "";
    out.push(maskEntity(text.slice(0, text.length - eol.length)) + eol);
  };
  for (const line of body.split(/(?<=\n)/)) {
    const bare = line.replace(/[ \t]*\r?\n$/, "");
    if (!closed && (bare === open || bare === close)) {
      flush();
      out.push(line);
      closed = bare === close;
      part = closed ? null : [];
      continue;
    }
    if (part) part.push(line);
    else out.push(line);
  }
  if (!closed) flush();
  return out.join("");
}

function maskEntity(entity: string): string {
  const split = /\r?\n\r?\n/.exec(entity);
  const head = split ? entity.slice(0, split.index) : entity;
  const sep = split ? split[0] : "";
  const body = split ? entity.slice(split.index + sep.length) : "";
  const eol = head.includes("\r\n") || sep.startsWith("\r\n") ? "\r\n" : "\n";
  const fields = parseFields(head, eol);
  const newHead = fields
    .map((f) => {
      if (!f.name) return f.raw;
      const plain = decodeWords(f.value);
      const masked = maskSecrets(plain);
      return masked === plain ? f.raw : `${f.name}: ${masked}`;
    })
    .join(eol);
  const type = fieldValue(fields, "content-type").toLowerCase();
  let newBody = body;
  if (type.startsWith("multipart/")) {
    const boundary = /boundary\s*=\s*(?:"([^"]+)"|([^;\s]+))/i.exec(fieldValue(fields, "content-type"));
    const b = boundary?.[1] ?? boundary?.[2];
    newBody = b ? maskMultipart(body, b) : maskSecrets(body);
  } else if (type === "" || type.startsWith("text/") || type.startsWith("message/")) {
    newBody = maskLeafBody(body, fieldValue(fields, "content-transfer-encoding").trim().toLowerCase(), eol);
  }
  return newHead + sep + newBody;
}

/** The message as received, with every secret in its headers and text parts masked. */
export function maskRawMessage(raw: Buffer): Buffer {
  return Buffer.from(maskEntity(raw.toString("latin1")), "latin1");
}
