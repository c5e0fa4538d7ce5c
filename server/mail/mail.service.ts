import nodemailer, { type Transporter, type TransportOptions } from "nodemailer";
import type { Logger } from "../core/logger.ts";
import type { Db } from "../db/knex.ts";
import type { OutboxMessage, OutboxQuery } from "#shared/schemas/outbox.ts";
import { pageWindow } from "#shared/schemas/paging.ts";
import { maskHeaders, maskRawMessage, maskSecrets } from "./mail.mask.ts";
import { findMessage, findRaw, listMessages, messageReached } from "./mail.repository.ts";

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

/** How a stored message is shown: its single-use and signed links masked (the stored copy keeps them). */
function masked(m: OutboxMessage): OutboxMessage {
  return { ...m, text: maskSecrets(m.text), html: maskSecrets(m.html), headers: maskHeaders(m.headers) };
}

/** The outbox views. Every one masks secrets: the stored messages hold other people's reset and invitation links. */
export function createOutboxService(db: Db) {
  return {
    /** One page of messages, newest first, and how many match in all. */
    list: async ({ page, pageSize, ...filter }: OutboxQuery) => {
      const { items, total } = await listMessages(db, filter, pageWindow({ page, pageSize }));
      return { items: items.map(masked), total };
    },
    get: async (id: number) => {
      const m = await findMessage(db, id);
      return m ? masked(m) : null;
    },
    raw: async (id: number) => {
      const raw = await findRaw(db, id);
      return raw ? maskRawMessage(raw) : null;
    },
    /**
     * Whether the local sink accepted a message with this Message-ID for this address: how a sender
     * interrupted between the relay's acceptance and its own record learns the message left.
     */
    accepted: (messageId: string, address: string): Promise<boolean> => messageReached(db, messageId, address),
  };
}
export type OutboxService = ReturnType<typeof createOutboxService>;
