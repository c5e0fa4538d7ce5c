import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { ReportCorrectInputSchema, ReportCreateInputSchema, ReportIssueInputSchema, ReportPatchInputSchema, ReportPdfQuerySchema } from "#shared/schemas/reports.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import { sendPrivateFile } from "../core/send-file.ts";
import type { ReportsService } from "./reports.service.ts";

// Marketing reads no money (decision 036), and a report is mostly money: leads, admins and investors only (decision 042).
const readers = () => requireRole("admin", "lead", "investor");
const writers = () => requireRole("lead", "admin");

/**
 * Monthly reports. Nothing is public (visitors 401); investors read issued investor reports (a
 * draft is not found for them), leads and admins read all and draft, comment, issue, correct;
 * marketing is refused (403).
 */
export function reportsRouter(reports: ReportsService): Router {
  const r = Router();

  r.get("/projects/:slug/reports", readers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await reports.list(slug, actorOf(req)));
  });
  r.post("/projects/:slug/reports", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = ReportCreateInputSchema.parse(req.body);
    res.status(201).json(await reports.create(slug, input, actorOf(req)));
  });
  r.get("/reports/:id", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await reports.get(id, actorOf(req)));
  });
  r.patch("/reports/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = ReportPatchInputSchema.parse(req.body);
    res.json(await reports.patch(id, input, actorOf(req)));
  });
  r.post("/reports/:id/issue", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = ReportIssueInputSchema.parse(req.body);
    res.json(await reports.issue(id, input, actorOf(req)));
  });
  r.post("/reports/:id/correct", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = ReportCorrectInputSchema.parse(req.body);
    res.status(201).json(await reports.correct(id, input, actorOf(req)));
  });

  // An issued report is its library document: an investor's copy is stamped for them and logged, sent whole.
  r.get("/reports/:id/pdf", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const query = ReportPdfQuerySchema.parse({ ...req.query });
    const file = await reports.pdf(id, query, actorOf(req), { address: req.ip ?? "", agent: req.get("user-agent") ?? "", record: req.method === "GET" });
    sendPrivateFile(res, file);
  });

  return r;
}
