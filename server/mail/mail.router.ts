import { Router } from "express";
import { OutboxQuerySchema } from "#shared/schemas/outbox.ts";
import { notFound, AppError } from "../core/app-error.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
import type { OutboxService } from "./mail.service.ts";

export function outboxRouter(outbox: OutboxService, mailMode: "local" | "smtp"): Router {
  const r = Router();
  // Administrators only: messages hold other people's links, and a colleague's reset link is their account.
  r.use("/outbox", requireRole("admin"), (_req, _res, next) => {
    if (mailMode !== "local") return next(new AppError("not_local_mail", "There is no outbox here: this server hands its mail to a delivery service and keeps no copies.", 404));
    next();
  });
  r.get("/outbox", route({ query: OutboxQuerySchema }, async ({ query, res }) => {
    const { items, total } = await outbox.list(query);
    res.set("X-Total-Count", String(total));
    return items;
  }));
  r.get("/outbox/:id", route(itemPath, async ({ params }) => {
    const m = await outbox.get(params.id);
    if (!m) throw notFound("That message");
    return m;
  }));
  r.get("/outbox/:id/raw", route(itemPath, async ({ params, res }) => {
    const raw = await outbox.raw(params.id);
    if (!raw) throw notFound("That message");
    res.type("message/rfc822").send(raw);
  }));
  return r;
}
