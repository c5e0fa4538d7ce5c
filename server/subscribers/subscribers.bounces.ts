import { createHmac, timingSafeEqual } from "node:crypto";
import type { Knex } from "knex";
import { MailEventsInputSchema, type MailEventsResult } from "#shared/schemas/subscribers.ts";
import { AppError } from "../core/app-error.ts";
import type { SubscribersContext } from "./subscribers.context.ts";
import { insertSuppression, setStatusByEmailHash, skipQueuedJobs } from "./subscribers.repository.ts";
import { hashAddress } from "./subscribers.tokens.ts";

/** A webhook signature older than this is refused (replay). */
export const WEBHOOK_TOLERANCE_S = 300;

/** Addresses that cannot or will not take our mail: SMTP refusals, and the provider's bounce and complaint events. */
export function createBounces(ctx: SubscribersContext) {
  const { db, logger, now } = ctx;

  /**
   * Marks every subscription of an address bounced or complained, puts it on the
   * suppression list and drops its queued mail. Used for SMTP 5xx answers and the
   * provider's webhook (and by digest sending).
   */
  async function markUndeliverable(email: string, reason: "bounced" | "complained", source: string, trx?: Knex.Transaction): Promise<void> {
    const run = async (q: Knex.Transaction) => {
      const hash = hashAddress(email);
      const ids = await setStatusByEmailHash(q, hash, reason, now());
      await insertSuppression(q, { emailHash: hash, reason, source });
      await skipQueuedJobs(q, ids, `address ${reason}`);
    };
    if (trx) await run(trx);
    else await db.transaction(run);
  }

  return {
    markUndeliverable,

    /**
     * The provider's bounce and complaint events. The signature covers the raw body and
     * a timestamp, so a forged or replayed call is refused before anything is read.
     */
    async handleMailEvents(raw: Buffer | undefined, signature: string | undefined): Promise<MailEventsResult> {
      const refuse = () => new AppError("signature_invalid", "The event signature is missing or wrong.", 401);
      if (!ctx.webhookSecret) {
        logger.warn("mail events refused: MAIL_WEBHOOK_SECRET is not set");
        throw refuse();
      }
      const body = Buffer.isBuffer(raw) ? raw : Buffer.alloc(0);
      const m = /^t=(\d{1,12}),v1=([0-9a-f]{64})$/.exec((signature ?? "").trim());
      if (!m) throw refuse();
      const ts = Number(m[1]);
      if (Math.abs(now().getTime() / 1000 - ts) > WEBHOOK_TOLERANCE_S) throw refuse();
      const expected = createHmac("sha256", ctx.webhookSecret).update(`${m[1]}.`).update(body).digest();
      const sent = Buffer.from(m[2]!, "hex");
      if (!timingSafeEqual(sent, expected)) throw refuse();
      let json: unknown;
      try {
        json = JSON.parse(body.toString("utf8"));
      } catch {
        throw new AppError("malformed_json", "The request body is not valid JSON.", 400);
      }
      const { events } = MailEventsInputSchema.parse(json);
      let processed = 0;
      await db.transaction(async (trx) => {
        for (const e of events) {
          if (e.type === "bounce" && !e.permanent) continue;
          await markUndeliverable(e.email, e.type === "bounce" ? "bounced" : "complained", "webhook", trx);
          processed++;
        }
      });
      return { processed, ignored: events.length - processed };
    },
  };
}
