import { z } from "zod";
import { plainText } from "./text.ts";

export const OutboxQuerySchema = z.strictObject({
  to: plainText().toLowerCase().max(254).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

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
