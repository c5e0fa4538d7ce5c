import nodemailer, { type Transporter, type TransportOptions } from "nodemailer";
import type { Logger } from "../core/logger.ts";
import type { Db } from "../db/knex.ts";
import { findMessage, findRaw, listMessages } from "./mail.repository.ts";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html: string;
  headers?: Record<string, string>;
}

export interface Mailer {
  mode: "local" | "smtp";
  send(mail: OutgoingMail): Promise<{ messageId: string }>;
  close(): void;
}

/** nodemailer over SMTP: the local sink in local mode, a hosted relay when SMTP_URL is set. */
export function createMailer(opts: { smtpUrl: string; from: string; mode: "local" | "smtp"; logger: Logger }): Mailer {
  const transport: Transporter =
    opts.mode === "local"
      ? nodemailer.createTransport({ url: opts.smtpUrl, ignoreTLS: true, pool: true, maxConnections: 4 } as TransportOptions)
      : nodemailer.createTransport(opts.smtpUrl);
  return {
    mode: opts.mode,
    async send(mail) {
      const info = await transport.sendMail({ from: opts.from, ...mail });
      opts.logger.debug({ to: mail.to, subject: mail.subject, messageId: info.messageId }, "mail sent");
      return { messageId: info.messageId };
    },
    close() {
      transport.close();
    },
  };
}

export function createOutboxService(db: Db) {
  return {
    list: (f: { to?: string; limit: number }) => listMessages(db, f),
    get: (id: number) => findMessage(db, id),
    raw: (id: number) => findRaw(db, id),
  };
}
export type OutboxService = ReturnType<typeof createOutboxService>;
