import { Router } from "express";
import { OrganisationInputSchema, UserOrganisationInputSchema } from "#shared/schemas/documents.ts";
import { InviteInputSchema, UserUpdateInputSchema } from "#shared/schemas/users.ts";
import { requireRole, requireStaff } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
import type { UsersService } from "./users.service.ts";

export function usersRouter(users: UsersService): Router {
  const r = Router();
  r.get("/users", requireRole("admin"), route({}, () => users.list()));
  // Who may own a risk or an action: staff pick owners from it (names only, no addresses).
  r.get("/users/staff", requireStaff(), route({}, () => users.listStaff()));
  r.get("/users/invitations", requireRole("admin"), route({}, () => users.listInvitations()));
  r.post("/users/invitations", requireRole("admin"), route({ body: InviteInputSchema, status: 201 }, ({ body, actor }) => users.invite(body, actor)));
  r.patch("/users/:id", requireRole("admin"), route({ ...itemPath, body: UserUpdateInputSchema }, ({ params, body, actor }) => users.update(params.id, body, actor)));
  r.patch("/users/:id/organisation", requireRole("admin"), route({ ...itemPath, body: UserOrganisationInputSchema }, ({ params, body, actor }) => users.setOrganisation(params.id, body, actor)));
  // Investor organisations: staff read them (limiting a document names some); admins add them.
  r.get("/organisations", requireStaff(), route({}, () => users.listOrganisations()));
  r.post("/organisations", requireRole("admin"), route({ body: OrganisationInputSchema, status: 201 }, ({ body, actor }) => users.createOrganisation(body, actor)));
  return r;
}
