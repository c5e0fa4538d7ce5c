import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { OrganisationInputSchema, UserOrganisationInputSchema } from "#shared/schemas/documents.ts";
import { InviteInputSchema, UserUpdateInputSchema } from "#shared/schemas/users.ts";
import { actorOf, requireRole, requireStaff } from "../core/auth.ts";
import type { UsersService } from "./users.service.ts";

export function usersRouter(users: UsersService): Router {
  const r = Router();
  r.get("/users", requireRole("admin"), async (_req, res) => {
    res.json(await users.list());
  });
  // Who may own a risk or an action: staff pick owners from it (names only, no addresses).
  r.get("/users/staff", requireStaff(), async (_req, res) => {
    res.json(await users.listStaff());
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
  r.patch("/users/:id/organisation", requireRole("admin"), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = UserOrganisationInputSchema.parse(req.body);
    res.json(await users.setOrganisation(id, input, actorOf(req)));
  });
  // Investor organisations: staff read them (limiting a document names some); admins add them.
  r.get("/organisations", requireStaff(), async (_req, res) => {
    res.json(await users.listOrganisations());
  });
  r.post("/organisations", requireRole("admin"), async (req, res) => {
    const input = OrganisationInputSchema.parse(req.body);
    res.status(201).json(await users.createOrganisation(input, actorOf(req)));
  });
  return r;
}
