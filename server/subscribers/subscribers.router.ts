import type { Request, RequestHandler } from "express";
import { Router } from "express";
import type { Store } from "express-rate-limit";
import multer from "multer";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import {
  EmptyInputSchema,
  InvestorDigestInputSchema,
  OneClickBodySchema,
  PreferencesInputSchema,
  SubscriberImportInputSchema,
  SubscriberFilterQuerySchema,
  SubscriberListQuerySchema,
  SubscriberTokenParamSchema,
  SubscriptionInputSchema,
} from "#shared/schemas/subscribers.ts";
import { AppError } from "../core/app-error.ts";
import { requestLimit } from "../core/request-limit.ts";
import { requireRole, requireStaff } from "../core/auth.ts";
import { itemPath, optionalBody, route } from "../core/route.ts";
import { SUBSCRIPTION_ACCEPTED } from "./subscribers.lifecycle.ts";
import type { SubscribersService } from "./subscribers.service.ts";

const tokenOf = (req: Request) => SubscriberTokenParamSchema.parse(req.params).token;
const addressOf = (req: Request) => String((req.body as { email?: unknown } | undefined)?.email ?? "").trim().toLowerCase();

/** Public subscription, signed-link pages, the investor room's digest and the site office's list. */
export function subscribersRouter(deps: {
  subscribers: SubscribersService;
  limits: { perIp: number; perAddress: number; windowMs: number };
  /** Shared counters (in MariaDB), so every process counts the same requests. */
  stores: { ip: Store; address: Store };
}): Router {
  const { subscribers } = deps;
  const r = Router();

  // Confirmations are limited per network and per address, whether or not the address is
  // known, so the limit itself tells nothing.
  const perIp = requestLimit({
    windowMs: deps.limits.windowMs,
    limit: deps.limits.perIp,
    store: deps.stores.ip,
    message: "Too many subscription requests from this network. Wait an hour and try again.",
  });
  const perAddress = requestLimit(
    {
      windowMs: deps.limits.windowMs,
      limit: deps.limits.perAddress,
      store: deps.stores.address,
      message: "Too many subscription requests for this address. Check your inbox, or wait an hour and try again.",
    },
    // A request naming no address confirms nothing; validation refuses it.
    { standardHeaders: false, skip: (req) => addressOf(req) === "", keyGenerator: (req) => addressOf(req) },
  );

  const link = { params: SubscriberTokenParamSchema };

  r.get("/projects/:slug/subscription-options", route({ params: SlugParamSchema }, ({ params }) => subscribers.options(params.slug)));

  r.post(
    "/subscriptions",
    perIp,
    perAddress,
    route({ body: SubscriptionInputSchema, status: 202 }, async ({ body, actor, res }) => {
      await subscribers.subscribe(body, actor);
      res.set("Cache-Control", "no-store");
      return SUBSCRIPTION_ACCEPTED;
    }),
  );

  r.get("/subscriptions/confirm/:token", route({ ...link, headers: { "Cache-Control": "no-store" } }, ({ params }) => subscribers.describeConfirmation(params.token)));
  r.post("/subscriptions/confirm/:token", route({ ...link, body: optionalBody(EmptyInputSchema) }, ({ params, actor }) => subscribers.confirm(params.token, actor)));

  r.get("/subscriptions/preferences/:token", route({ ...link, headers: { "Cache-Control": "no-store" } }, ({ params }) => subscribers.describePreferences(params.token)));
  r.patch("/subscriptions/preferences/:token", route({ ...link, body: PreferencesInputSchema }, ({ params, body }) => subscribers.updatePreferences(params.token, body)));
  r.post("/subscriptions/preferences/:token/unsubscribe", route({ ...link, body: optionalBody(EmptyInputSchema) }, ({ params }) => subscribers.unsubscribeWithPreferencesLink(params.token)));

  r.get("/subscriptions/unsubscribe/:token", route({ ...link, headers: { "Cache-Control": "no-store" } }, ({ params }) => subscribers.describeUnsubscribe(params.token)));
  r.post("/subscriptions/unsubscribe/:token", route({ ...link, body: optionalBody(EmptyInputSchema) }, ({ params }) => subscribers.unsubscribe(params.token)));

  r.get("/investors/digest", requireRole("investor"), route({}, ({ actor }) => subscribers.investorDigest(actor.user!)));
  r.patch("/investors/digest/:slug", requireRole("investor"), route({ params: SlugParamSchema, body: InvestorDigestInputSchema }, ({ params, body, actor }) => subscribers.setInvestorDigest(actor.user!, params.slug, body, actor)));

  r.get("/subscribers", requireStaff(), route({ query: SubscriberListQuerySchema }, ({ query }) => subscribers.list(query)));
  r.get(
    "/subscribers/export.csv",
    requireStaff(),
    route({ query: SubscriberFilterQuerySchema }, async ({ query, res }) => {
      const csv = await subscribers.exportCsv(query);
      res
        .status(200)
        .type("text/csv; charset=utf-8")
        .set("Cache-Control", "no-store")
        .attachment(`subscribers-${new Date().toISOString().slice(0, 10)}.csv`)
        .send(csv);
    }),
  );
  r.post("/subscribers/import", requireStaff(), route({ body: SubscriberImportInputSchema }, ({ body }) => subscribers.importCsv(body)));
  r.get(
    "/subscribers/:id/export",
    requireStaff(),
    route(itemPath, async ({ params, res }) => {
      const data = await subscribers.personData(params.id);
      res.set("Cache-Control", "no-store").attachment(`subscriber-${params.id}.json`);
      return data;
    }),
  );
  r.delete("/subscribers/:id", requireStaff(), route(itemPath, ({ params }) => subscribers.erase(params.id)));

  return r;
}

/**
 * The hosted provider's bounce and complaint webhook. It is outside the CSRF check (its
 * HMAC signature stands in) and reads its body raw, since the signature covers the bytes.
 */
export function mailEventsRouter(subscribers: SubscribersService): Router {
  const r = Router();
  r.post("/webhooks/mail-events", async (req, res) => {
    res.json(await subscribers.handleMailEvents(req.body as Buffer | undefined, req.get("plumbline-signature")));
  });
  return r;
}

// RFC 8058 §3.1 names application/x-www-form-urlencoded; multipart/form-data is accepted
// too, since some mail clients send the one field that way.
const multipartFields = multer({ limits: { fields: 5, fieldSize: 200, files: 0 } }).none();
const readMultipart: RequestHandler = (req, res, next) => {
  if (!req.is("multipart/form-data")) return next();
  multipartFields(req, res, (err?: unknown) => (err ? next(new AppError("bad_request", "The request body could not be read.", 400)) : next()));
};

/**
 * RFC 8058 one-click unsubscribe at `/u/:token`, outside /api: a POST with the body
 * `List-Unsubscribe=One-Click` unsubscribes at once and answers 200 with no redirect. The
 * signed token in the URL stands in for a CSRF token. A GET falls through to the page.
 */
export function oneClickRouter(subscribers: SubscribersService): Router {
  const r = Router();
  r.post("/u/:token", readMultipart, async (req, res) => {
    const token = tokenOf(req);
    OneClickBodySchema.parse({ ...(req.body ?? {}) });
    await subscribers.unsubscribe(token);
    res.status(200).set("Cache-Control", "no-store").type("text/plain; charset=utf-8").send("Unsubscribed. No more e-mail about this project will be sent to this address.\n");
  });
  return r;
}
