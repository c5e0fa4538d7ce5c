import { Router } from "express";
import { z } from "zod";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { AppError } from "../core/app-error.ts";
import { requireRole } from "../core/auth.ts";
import { optionalBody, projectPath, route } from "../core/route.ts";
import type { CalendarsService } from "./calendars.service.ts";

const CALENDAR_TYPE = "text/calendar; charset=utf-8";
/** The public calendar is the same for everyone: a shared cache may keep it five minutes. */
const PUBLIC_CACHE = "public, max-age=300, stale-while-revalidate=600";
const FeedFileSchema = z.strictObject({ file: z.string().max(60).regex(/^[A-Za-z0-9_-]+\.ics$/) });
const NoBodySchema = z.strictObject({});

/** The personal feeds' API (signed-in investors and staff), under /api. */
export function calendarFeedsRouter(calendars: CalendarsService): Router {
  const r = Router();
  r.post("/projects/:slug/calendar-feed", requireRole(), route({ ...projectPath, body: optionalBody(NoBodySchema), status: 201 }, ({ params, actor }) => calendars.createFeed(params.slug, actor)));
  r.delete("/projects/:slug/calendar-feed", requireRole(), route({ ...projectPath, status: 204 }, ({ params, actor }) => calendars.revokeFeed(params.slug, actor)));
  return r;
}

/** The calendar files, mounted at the root: the public one, and personal ones whose token is the credential. */
export function calendarFilesRouter(calendars: CalendarsService): Router {
  const r = Router();
  r.get("/projects/:slug/calendar.ics", route({ params: SlugParamSchema }, async ({ params, res }) => {
    res.set("Cache-Control", PUBLIC_CACHE).type(CALENDAR_TYPE).send(await calendars.publicCalendar(params.slug));
  }));
  r.get("/calendars/:file", async (req, res) => {
    const parsed = FeedFileSchema.safeParse(req.params);
    if (!parsed.success) throw new AppError("not_found", "That calendar was not found.", 404);
    const text = await calendars.personalCalendar(parsed.data.file.replace(/\.ics$/, ""));
    // The URL is the credential: kept by no cache, and not sent onward from any link.
    res.set({ "Cache-Control": "private, no-store", "Referrer-Policy": "no-referrer" }).type(CALENDAR_TYPE).send(text);
  });
  return r;
}
