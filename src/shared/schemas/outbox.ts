import { z } from "zod";
import { pageQueryShape } from "./paging.ts";
import { plainText } from "./text.ts";

export const OUTBOX_PAGE_SIZE = 50;

/** GET /api/outbox: one page of messages, newest first; the total matching is in `X-Total-Count`. */
export const OutboxQuerySchema = z.strictObject({
  to: plainText().toLowerCase().max(254).optional(),
  ...pageQueryShape(OUTBOX_PAGE_SIZE),
});
export type OutboxQuery = z.infer<typeof OutboxQuerySchema>;

/** GET /api/outbox (a list of these) and GET /api/outbox/:id: one message the sink stored, links masked. */
export const OutboxMessageSchema = z.object({
  id: z.number(),
  /** Envelope recipients, comma-separated. */
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  receivedAt: z.string(),
  text: z.string(),
  html: z.string(),
  headers: z.record(z.string(), z.string()),
});
export type OutboxMessage = z.infer<typeof OutboxMessageSchema>;
