import { z } from "zod";
import { plainText } from "./text.ts";

export const OutboxQuerySchema = z.strictObject({
  to: plainText().toLowerCase().max(254).optional(),
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
