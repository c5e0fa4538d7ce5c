import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { InviteInputSchema, UserUpdateInputSchema } from "#shared/schemas/users.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { UsersService } from "./users.service.ts";

export function usersRouter(users: UsersService): Router {
  const r = Router();
  r.get("/users", requireRole("admin"), async (_req, res) => {
    res.json(await users.list());
  });
  r.get("/users/invitations", requireRole("admin"), async (_req, res) => {
    res.json(await users.listInvitations());
  });
  r.post("/users/invitations", requireRole("admin"), async (req, res) => {
    const input = InviteInputSchema.parse(req.body);
    res.status(201).json(await users.invite(input, actorOf(req)));
  });
  r.patch("/users/:id", requireRole("admin"), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const patch = UserUpdateInputSchema.parse(req.body);
    res.json(await users.update(id, patch, actorOf(req)));
  });
  return r;
}
