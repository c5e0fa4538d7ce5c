import { Router } from "express";
import type { Store } from "express-rate-limit";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { EnquiryInputSchema, EnquiryListQuerySchema, EnquiryPatchSchema } from "#shared/schemas/enquiries.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { requestLimit } from "../core/request-limit.ts";
import { actorOf, requireStaff } from "../core/auth.ts";
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

  r.post("/projects/:slug/enquiries", perIp, async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = EnquiryInputSchema.parse(req.body);
    await enquiries.submit(slug, input, actorOf(req));
    res.status(202).json(ENQUIRY_ACCEPTED);
  });

  r.get("/enquiries", requireStaff(), async (req, res) => {
    const query = EnquiryListQuerySchema.parse({ ...req.query });
    res.json(await enquiries.list(query));
  });
  r.get("/enquiries/owners", requireStaff(), async (_req, res) => {
    res.json(await enquiries.owners());
  });
  r.get("/enquiries/:id", requireStaff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await enquiries.get(id));
  });
  r.patch("/enquiries/:id", requireStaff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const patch = EnquiryPatchSchema.parse(req.body);
    res.json(await enquiries.update(id, patch));
  });
  return r;
}
