import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { ReportCorrectInputSchema, ReportCreateInputSchema, ReportIssueInputSchema, ReportPatchInputSchema, ReportPdfQuerySchema } from "#shared/schemas/reports.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
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

  r.get("/projects/:slug/reports", readers(), route(projectPath, ({ params, actor }) => reports.list(params.slug, actor)));
  r.post("/projects/:slug/reports", writers(), route({ ...projectPath, body: ReportCreateInputSchema, status: 201 }, ({ params, body, actor }) => reports.create(params.slug, body, actor)));
  r.get("/reports/:id", readers(), route(itemPath, ({ params, actor }) => reports.get(params.id, actor)));
  r.patch("/reports/:id", writers(), route({ ...itemPath, body: ReportPatchInputSchema }, ({ params, body, actor }) => reports.patch(params.id, body, actor)));
  r.post("/reports/:id/issue", writers(), route({ ...itemPath, body: ReportIssueInputSchema }, ({ params, body, actor }) => reports.issue(params.id, body, actor)));
  r.post("/reports/:id/correct", writers(), route({ ...itemPath, body: ReportCorrectInputSchema, status: 201 }, ({ params, body, actor }) => reports.correct(params.id, body, actor)));

  // An issued report is its library document: an investor's copy is stamped for them and logged, sent whole.
  r.get("/reports/:id/pdf", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const query = ReportPdfQuerySchema.parse({ ...req.query });
    const file = await reports.pdf(id, query, actorOf(req), { address: req.ip ?? "", agent: req.get("user-agent") ?? "", record: req.method === "GET" });
    sendPrivateFile(res, file);
  });

  return r;
}
