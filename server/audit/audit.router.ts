import { Router } from "express";
import { AuditQuerySchema } from "#shared/schemas/users.ts";
import { requireRole } from "../core/auth.ts";
import { route } from "../core/route.ts";
import type { AuditService } from "./audit.service.ts";

export function auditRouter(audit: AuditService): Router {
  const r = Router();
  r.get("/audit", requireRole("admin"), route({ query: AuditQuerySchema }, async ({ query, res }) => {
    const { items, total } = await audit.list(query);
    res.set("X-Total-Count", String(total));
    return items;
  }));
  return r;
}
