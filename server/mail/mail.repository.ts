import type { Knex } from "knex";
import type { OutboxMessage } from "#shared/schemas/outbox.ts";
import { countOf, instant, json, num, readRow, text } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

export interface StoredMessageInsert {
  messageId: string | null;
  envelopeFrom: string | null;
  recipients: string[];
  toHeader: string | null;
  fromHeader: string | null;
  subject: string | null;
  text: string | null;
  html: string | null;
  headers: Record<string, string>;
  raw: Buffer;
}

export async function insertMessage(db: Knex, m: StoredMessageInsert): Promise<number> {
  return db.transaction(async (trx) => {
    const [id] = await trx("mail_messages").insert({
      message_id: m.messageId?.slice(0, 512) ?? null,
      envelope_from: m.envelopeFrom?.slice(0, 512) ?? null,
      to_header: m.toHeader,
      from_header: m.fromHeader,
      subject: m.subject?.slice(0, 998) ?? null,
      text: m.text,
      html: m.html,
      headers: JSON.stringify(m.headers),
      raw: m.raw,
      received_at: new Date(),
    });
    const unique = [...new Set(m.recipients.map((r) => r.toLowerCase()))];
    if (unique.length > 0) {
      await trx("mail_recipients").insert(unique.map((address) => ({ message_id: id, address })));
    }
    return Number(id);
  });
}

const toMessage = readRow<OutboxMessage>({
  id: num(), to: text("recipients"), from: (row) => String(row.from_header ?? row.envelope_from ?? ""), subject: text(), receivedAt: instant(), text: text(), html: text(),
  headers: json<Record<string, string>>({}),
});

function baseQuery(q: Q) {
  return q("mail_messages as m")
    .select(
      "m.id",
      "m.from_header",
      "m.envelope_from",
      "m.subject",
      "m.received_at",
      "m.text",
      "m.html",
      "m.headers",
      q.raw("(SELECT GROUP_CONCAT(r.address ORDER BY r.address SEPARATOR ', ') FROM mail_recipients r WHERE r.message_id = m.id) AS recipients"),
    );
}

/** One page of messages, newest first, with how many match in all. */
export async function listMessages(q: Q, f: { to?: string }, window: { offset: number; limit: number }): Promise<{ items: OutboxMessage[]; total: number }> {
  const toRecipient = (query: Knex.QueryBuilder) => (f.to ? query.whereExists(q("mail_recipients as x").whereRaw("x.message_id = m.id").andWhere("x.address", f.to)) : query);
  const [rows, total] = await Promise.all([toRecipient(baseQuery(q)).orderBy("m.id", "desc").offset(window.offset).limit(window.limit), countOf(toRecipient(q("mail_messages as m")))]);
  return { items: rows.map(toMessage), total };
}

export async function findMessage(q: Q, id: number): Promise<OutboxMessage | null> {
  const r = await baseQuery(q).where("m.id", id).first();
  return r ? toMessage(r) : null;
}

export async function findRaw(q: Q, id: number): Promise<Buffer | null> {
  const r = await q("mail_messages").select("raw").where({ id }).first();
  return r ? (r.raw as Buffer) : null;
}

/** Whether the sink stored a message with this Message-ID for this address. */
export async function messageReached(q: Q, messageId: string, address: string): Promise<boolean> {
  const r = await q("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", address.toLowerCase()).andWhere("m.message_id", messageId).first("m.id");
  return Boolean(r);
}
