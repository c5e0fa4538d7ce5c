import { Router } from "express";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { DraftFromSuggestionInputSchema, DraftSuggestionQuerySchema } from "#shared/schemas/writing-help.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { WritingHelpService } from "./writing-help.service.ts";

/** Those who start updates: leads, marketing and administrators (decision 061). */
const writers = () => requireRole("lead", "marketing", "admin");

/** Help for the people who write: the draft suggested by the programme, and a draft made from it. */
export function writingHelpRouter(writingHelp: WritingHelpService): Router {
  const r = Router();

  r.get("/projects/:slug/draft-suggestion", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const { audience } = DraftSuggestionQuerySchema.parse({ ...req.query });
    res.json(await writingHelp.suggestion(slug, audience, actorOf(req)));
  });
  r.post("/projects/:slug/draft-suggestion/draft", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const { audience } = DraftFromSuggestionInputSchema.parse(req.body);
    res.status(201).json(await writingHelp.createDraft(slug, audience, actorOf(req)));
  });

  return r;
}
