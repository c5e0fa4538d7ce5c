import type { Request, RequestHandler, Response } from "express";
import { z } from "zod";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf } from "./auth.ts";
import type { Actor } from "./types.ts";

/**
 * What a JSON route reads from the request: each part it names is parsed by its zod schema, in
 * the order path → query → body, before anything runs, so a wrong request is refused (400 in the
 * fixed error shape, by the error handler) with nothing done. A part it does not name is not read.
 */
export interface RouteParts {
  params?: z.ZodType;
  query?: z.ZodType;
  body?: z.ZodType;
  /** The answer's status: 200 by default; 204 sends no body (whatever the use case returned). */
  status?: 200 | 201 | 202 | 204;
  /** Headers the answer carries (a cache rule of its own, `noindex`), set once the request is read. */
  headers?: Record<string, string>;
}

type Parsed<S> = S extends z.ZodType ? z.output<S> : undefined;

/** A use case's view of a request: the parsed parts and who is asking (`req` and `res` for the odd route that answers in another form). */
export interface RouteInput<P extends RouteParts> {
  params: Parsed<P["params"]>;
  query: Parsed<P["query"]>;
  body: Parsed<P["body"]>;
  actor: Actor;
  req: Request;
  res: Response;
}

/**
 * The usual route: parse the parts, run the use case, answer its result as JSON with the given
 * status. A use case that has answered by itself before returning (`send`, `redirect`, a CSV) is
 * left alone. A piped stream has not answered yet when the use case returns (its headers go with
 * the first chunk), so a route that streams a file stays hand-written.
 */
export function route<P extends RouteParts>(parts: P, run: (input: RouteInput<P>) => unknown): RequestHandler {
  return async (req, res) => {
    const params = parts.params?.parse(req.params);
    const query = parts.query?.parse({ ...req.query });
    const body = parts.body?.parse(req.body);
    if (parts.headers) res.set(parts.headers);
    const result = await run({ params, query, body, actor: actorOf(req), req, res } as RouteInput<P>);
    if (res.headersSent) return;
    if (parts.status === 204) res.status(204).end();
    else res.status(parts.status ?? 200).json(result);
  };
}

/** The path of a route under one project (`/projects/:slug/…`) and under one item (`/<things>/:id…`). */
export const projectPath = { params: SlugParamSchema };
export const itemPath = { params: IdParamSchema };

/** A body that may be left out altogether (a DELETE's optional reason): no body reads as `{}`. */
export function optionalBody<S extends z.ZodType>(schema: S) {
  return z.preprocess((value) => value ?? {}, schema);
}
