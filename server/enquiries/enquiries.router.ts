import { Router } from "express";
import type { Store } from "express-rate-limit";
import { EnquiryInputSchema, EnquiryListQuerySchema, EnquiryPatchSchema } from "#shared/schemas/enquiries.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { requestLimit } from "../core/request-limit.ts";
import { requireStaff } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
import { ENQUIRY_ACCEPTED, type EnquiriesService } from "./enquiries.service.ts";

export function enquiriesRouter(deps: { enquiries: EnquiriesService; limit: { perIp: number; windowMs: number }; store: Store }): Router {
  const { enquiries } = deps;
  const r = Router();

  // A second spam guard beside the honeypot, shared by every app process through MariaDB.
  const perIp = requestLimit({
    windowMs: deps.limit.windowMs,
    limit: deps.limit.perIp,
    store: deps.store,
    message: "Too many enquiries from this network. Wait an hour, or write to the operator directly.",
  });

  r.post("/projects/:slug/enquiries", perIp, route({ params: SlugParamSchema, body: EnquiryInputSchema, status: 202 }, async ({ params, body, actor }) => {
    await enquiries.submit(params.slug, body, actor);
    return ENQUIRY_ACCEPTED;
  }));

  r.get("/enquiries", requireStaff(), route({ query: EnquiryListQuerySchema }, ({ query }) => enquiries.list(query)));
  r.get("/enquiries/owners", requireStaff(), route({}, () => enquiries.owners()));
  r.get("/enquiries/:id", requireStaff(), route(itemPath, ({ params }) => enquiries.get(params.id)));
  r.patch("/enquiries/:id", requireStaff(), route({ ...itemPath, body: EnquiryPatchSchema }, ({ params, body }) => enquiries.update(params.id, body)));
  return r;
}
