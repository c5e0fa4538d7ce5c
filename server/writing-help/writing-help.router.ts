import { Router } from "express";
import { DraftFromSuggestionInputSchema, DraftSuggestionQuerySchema } from "#shared/schemas/writing-help.ts";
import { requireRole } from "../core/auth.ts";
import { projectPath, route } from "../core/route.ts";
import type { WritingHelpService } from "./writing-help.service.ts";

/** Those who start updates: leads, marketing and administrators (decision 061). */
const writers = () => requireRole("lead", "marketing", "admin");

/** Help for the people who write: the draft suggested by the programme, and a draft made from it. */
export function writingHelpRouter(writingHelp: WritingHelpService): Router {
  const r = Router();

  r.get("/projects/:slug/draft-suggestion", writers(), route({ ...projectPath, query: DraftSuggestionQuerySchema }, ({ params, query, actor }) => writingHelp.suggestion(params.slug, query.audience, actor)));
  r.post("/projects/:slug/draft-suggestion/draft", writers(), route({ ...projectPath, body: DraftFromSuggestionInputSchema, status: 201 }, ({ params, body, actor }) => writingHelp.createDraft(params.slug, body.audience, actor)));

  return r;
}
