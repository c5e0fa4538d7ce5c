import type { Response } from "express";
import type { Readable } from "node:stream";

/** A file as a route sends it: bytes made for the reader, or a stored file's stream and length. */
export type SendableFile = { name: string; mime: string; disposition: "inline" | "attachment" } & ({ bytes: Uint8Array } | { stream: Readable; length: number });

/**
 * A Content-Disposition header for a file sent by name: an ASCII fallback and the UTF-8 name
 * (RFC 6266 §4.3), so every browser saves it under a readable name.
 */
const contentDisposition = (kind: "inline" | "attachment", name: string) =>
  `${kind}; filename="${name.replace(/[^\x20-\x7e]|["\\]/g, "_")}"; filename*=UTF-8''${encodeURIComponent(name)}`;

/**
 * Sends a private file whole (no ranges: one request is one read, which is what a view log
 * counts), never stored by a cache.
 */
export function sendPrivateFile(res: Response, file: SendableFile): void {
  res.set({
    "Content-Type": file.mime,
    "Content-Disposition": contentDisposition(file.disposition, file.name),
    "Cache-Control": "private, no-store",
    "Accept-Ranges": "none",
  });
  if ("bytes" in file) {
    res.set("Content-Length", String(file.bytes.length)).end(Buffer.from(file.bytes.buffer, file.bytes.byteOffset, file.bytes.byteLength));
    return;
  }
  res.set("Content-Length", String(file.length));
  file.stream.on("error", (err) => res.destroy(err));
  file.stream.pipe(res);
}
