import { Router } from "express";
import { actorOf, requireStaff } from "../core/auth.ts";
import type { OfficeService } from "./office.service.ts";

/** GET /api/office/waiting (staff): the overview's "Waiting for you", personal, so never kept by a cache. */
export function officeRouter(office: OfficeService): Router {
  const r = Router();
  r.get("/office/waiting", requireStaff(), async (req, res) => {
    res.set("Cache-Control", "private, no-store").json({ items: await office.waitingFor(actorOf(req)) });
  });
  return r;
}
