/**
 * Who reads the investor's record (risks and issues, decisions needed, budget changes, documents).
 * Nothing of it is ever public. The rule, decided by the project lead (docs/decisions/036):
 * - investors read investor-audience items;
 * - leads and administrators read (and write) everything;
 * - marketing reads investor-audience risks, decisions and documents — what investors are
 *   already told — but never money: cost exposures, expected costs, option costs and budget
 *   changes are withheld from them.
 */
import type { Role } from "../schemas/common.ts";
import type { RecordAudience } from "../schemas/risks.ts";

export interface RecordReader {
  /** The audiences of items this reader may see. */
  audiences: readonly RecordAudience[];
  /** Whether money figures are shown to this reader. */
  money: boolean;
  /** How the reader sees other modules' records (milestones, blocks, systems): investor or staff. */
  viewer: "investor" | "staff";
}

const READERS: Record<Role, RecordReader> = {
  admin: { audiences: ["investor", "internal"], money: true, viewer: "staff" },
  lead: { audiences: ["investor", "internal"], money: true, viewer: "staff" },
  marketing: { audiences: ["investor"], money: false, viewer: "staff" },
  investor: { audiences: ["investor"], money: true, viewer: "investor" },
};

/** The reader a signed-in role reads the record as. */
export function recordReaderOf(role: Role): RecordReader {
  return READERS[role];
}

/**
 * The reader of another module's digest or summary, by the audience it writes for: an investor's
 * digest reads as an investor; staff's as a lead (everything, money included).
 */
export function recordReaderOfViewer(viewer: "investor" | "staff"): RecordReader {
  return viewer === "investor" ? READERS.investor : READERS.lead;
}
