import type { AddressInfo } from "node:net";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import type { Logger } from "../core/logger.ts";
import type { Db } from "../db/knex.ts";
import { insertMessage } from "./mail.repository.ts";

export interface MailSink {
  host: string;
  port: number;
  close(): Promise<void>;
}

/** Header block → lower-case name → unfolded raw value; repeated names joined by ", ". */
export function headersOf(raw: Buffer): Record<string, string> {
  const text = raw.toString("latin1");
  const end = text.search(/\r?\n\r?\n/);
  const block = (end >= 0 ? text.slice(0, end) : text).replace(/\r?\n[ \t]/g, " ");
  const out: Record<string, string> = {};
  for (const line of block.split(/\r?\n/)) {
    const i = line.indexOf(":");
    if (i <= 0) continue;
    const name = line.slice(0, i).trim().toLowerCase();
    const value = line.slice(i + 1).trim();
    out[name] = out[name] === undefined ? value : `${out[name]}, ${value}`;
  }
  return out;
}

/**
 * The local stand-in for a hosted mail provider: an SMTP server on loopback that parses
 * each message and keeps it in MariaDB for the site office's outbox.
 */
export async function startMailSink(opts: {
  db: Db;
  logger: Logger;
  host: string;
  port: number;
  refuseRecipients?: RegExp | null;
}): Promise<MailSink> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    banner: "Plumbline local mail sink",
    size: 25 * 1024 * 1024,
    logger: false,
    onRcptTo(address, _session, cb) {
      if (opts.refuseRecipients?.test(address.address)) {
        const err = Object.assign(new Error("Mailbox unavailable (refused by the local sink's bounce rule)"), { responseCode: 550 });
        return cb(err);
      }
      cb();
    },
    onData(stream, session, cb) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", (err) => cb(err));
      stream.on("end", () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) =>
            insertMessage(opts.db, {
              messageId: parsed.messageId ?? null,
              envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
              recipients: session.envelope.rcptTo.map((r) => r.address),
              toHeader: parsed.to ? (Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(", ") : parsed.to.text) : null,
              fromHeader: parsed.from?.text ?? null,
              subject: parsed.subject ?? null,
              text: parsed.text ?? null,
              html: typeof parsed.html === "string" ? parsed.html : null,
              headers: headersOf(raw),
              raw,
            }),
          )
          .then(() => cb())
          .catch((err: unknown) => {
            opts.logger.error({ err }, "mail sink could not store a message");
            cb(Object.assign(new Error("Temporary failure storing the message"), { responseCode: 451 }));
          });
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host, () => resolve());
  });
  server.on("error", (err) => opts.logger.error({ err }, "mail sink error"));
  const port = (server.server.address() as AddressInfo).port;
  opts.logger.info({ host: opts.host, port }, "local mail sink listening");
  return {
    host: opts.host,
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
