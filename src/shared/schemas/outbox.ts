import { z } from "zod";

export const OutboxQuerySchema = z.strictObject({
  to: z.string().trim().toLowerCase().max(254).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

export interface OutboxMessage {
  id: number;
  /** Envelope recipients, comma-separated. */
  to: string;
  from: string;
  subject: string;
  receivedAt: string;
  text: string;
  html: string;
  headers: Record<string, string>;
}
