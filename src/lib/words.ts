import type { Audience } from "#shared/schemas/common.ts";

/**
 * The one name of each audience on every screen (the stored codes stay `public | investor |
 * internal`). "Internal" was the code leaking into the interface beside "Staff only" for the
 * same thing; "Staff only" says who may read it. Decision 056.
 */
export const AUDIENCE_WORD: Record<Audience, string> = { public: "Public", investor: "Investors", internal: "Staff only" };
