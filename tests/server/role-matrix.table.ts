/**
 * Who may call what: one row per route, the expected status per caller. Later modules add
 * their rows here. Write routes are called with an empty body, so a caller who is let in
 * gets 400 (validation) and nothing is written; one who is not gets 401 or 403.
 */
export type Caller = "admin" | "lead" | "marketing" | "investor" | "anonymous";
export interface MatrixRow {
  method: "get" | "post" | "patch" | "delete";
  path: string;
  body?: unknown;
  expect: Record<Caller, number>;
}

const all = (status: number): Record<Caller, number> => ({ admin: status, lead: status, marketing: status, investor: status, anonymous: status });
const adminOnly = (ok: number): Record<Caller, number> => ({ admin: ok, lead: 403, marketing: 403, investor: 403, anonymous: 401 });
const staffOnly = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: ok, investor: 403, anonymous: 401 });
const signedIn = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: ok, investor: ok, anonymous: 401 });

export const ROLE_MATRIX: MatrixRow[] = [
  { method: "get", path: "/api/health", expect: all(200) },
  { method: "get", path: "/api/auth/csrf", expect: all(200) },
  { method: "get", path: "/api/auth/me", expect: signedIn(200) },
  { method: "post", path: "/api/auth/login", body: {}, expect: all(400) },
  { method: "get", path: "/api/auth/invitations/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa", expect: all(404) },
  { method: "post", path: "/api/auth/invitations/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa/accept", body: {}, expect: all(400) },
  { method: "post", path: "/api/auth/password-reset", body: {}, expect: all(400) },
  { method: "post", path: "/api/auth/password-reset/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa", body: {}, expect: all(400) },
  { method: "get", path: "/api/users", expect: adminOnly(200) },
  { method: "get", path: "/api/users/invitations", expect: adminOnly(200) },
  { method: "post", path: "/api/users/invitations", body: {}, expect: adminOnly(400) },
  { method: "patch", path: "/api/users/1", body: {}, expect: adminOnly(400) },
  { method: "get", path: "/api/audit", expect: adminOnly(200) },
  { method: "get", path: "/api/outbox", expect: staffOnly(200) },
  { method: "get", path: "/api/outbox/999999999", expect: staffOnly(404) },
  { method: "get", path: "/api/outbox/999999999/raw", expect: staffOnly(404) },
  { method: "get", path: "/api/projects", expect: all(200) },
  { method: "get", path: "/api/projects/aldermere-phase-2", expect: all(200) },
  { method: "get", path: "/api/projects/no-such-project", expect: all(404) },
  { method: "get", path: "/office", expect: all(200) },
  { method: "get", path: "/office/users", expect: all(200) },
  { method: "get", path: "/investors", expect: all(200) },
  { method: "get", path: "/investors/projects/aldermere-phase-2", expect: all(200) },
  { method: "get", path: "/projects/aldermere-phase-2", expect: all(200) },
  { method: "post", path: "/api/auth/logout", expect: all(204) },
];
