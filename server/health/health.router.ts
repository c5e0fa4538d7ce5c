import { Router } from "express";
import type { Db } from "../db/knex.ts";
import { pingDatabase } from "./health.repository.ts";

export function healthRouter(db: Db): Router {
  const r = Router();
  r.get("/health", async (_req, res) => {
    const up = await pingDatabase(db);
    res.set("Cache-Control", "no-store").status(up ? 200 : 503).json({ ok: up, db: up ? "up" : "down" });
  });
  return r;
}
