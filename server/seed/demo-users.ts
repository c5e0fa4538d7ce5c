import type { Role } from "#shared/schemas/common.ts";

/** The demo sign-ins of DESIGN.md's invented scenario (one per role). */
export const DEMO_USERS: ReadonlyArray<{ email: string; name: string; role: Role }> = [
  { email: "admin@kestrel.example", name: "Morgan Reyes", role: "admin" },
  { email: "lead@kestrel.example", name: "Priya Castell", role: "lead" },
  { email: "marketing@kestrel.example", name: "Jonah Whitlow", role: "marketing" },
  { email: "investor@harbourfund.example", name: "Elena Marsh", role: "investor" },
];
