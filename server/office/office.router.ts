import { Router } from "express";
import { requireStaff } from "../core/auth.ts";
import { route } from "../core/route.ts";
import type { OfficeService } from "./office.service.ts";

/** GET /api/office/waiting (staff): the overview's "Waiting for you", personal, so never kept by a cache. */
export function officeRouter(office: OfficeService): Router {
  const r = Router();
  r.get("/office/waiting", requireStaff(), route({}, async ({ actor, res }) => {
    res.set("Cache-Control", "private, no-store");
    return { items: await office.waitingFor(actor) };
  }));
  return r;
}
