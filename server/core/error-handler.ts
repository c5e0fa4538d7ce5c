import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";
import { AppError } from "./app-error.ts";

export interface ErrorBody {
  error: { code: string; message: string; fields?: Record<string, string>; [k: string]: unknown };
}

export function zodFields(err: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of err.issues) {
    if (issue.code === "unrecognized_keys") {
      for (const key of issue.keys) fields[[...issue.path, key].join(".")] = "is not a known field";
      continue;
    }
    const key = issue.path.join(".") || "_";
    fields[key] ??= issue.message;
  }
  return fields;
}

/** Seconds a caller is asked to wait when the database cannot be reached. */
export const UNAVAILABLE_RETRY_AFTER_SECONDS = 5;

const UNREACHABLE_CODES = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EHOSTUNREACH", "EPIPE", "PROTOCOL_CONNECTION_LOST", "ER_CON_COUNT_ERROR", "ER_SERVER_SHUTDOWN", "ER_NORMAL_SHUTDOWN"]);

/**
 * The database cannot be reached just now (refused or dropped connections, a server shutting
 * down or out of connections, or no pooled connection within the wait): nothing about the request
 * is wrong and the pool reconnects by itself once the server is back, so the caller is asked to
 * try again rather than told of a fault.
 */
export function isDatabaseUnavailable(err: unknown): boolean {
  if (!err || typeof err !== "object") return false;
  const e = err as { code?: unknown; name?: unknown; fatal?: unknown };
  if (typeof e.code === "string" && UNREACHABLE_CODES.has(e.code)) return true;
  return e.name === "KnexTimeoutError";
}

/** The single place where errors become HTTP answers, always in the fixed shape. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  let status = 500;
  let body: ErrorBody;
  if (err instanceof ZodError) {
    status = 400;
    const fields = zodFields(err);
    const names = Object.keys(fields);
    body = { error: { code: "validation", message: `Check ${names.join(", ")}.`, fields } };
  } else if (err instanceof AppError) {
    status = err.status;
    body = { error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}), ...err.details } };
  } else if (err && typeof err === "object" && "type" in err && err.type === "entity.parse.failed") {
    status = 400;
    body = { error: { code: "malformed_json", message: "The request body is not valid JSON." } };
  } else if (err && typeof err === "object" && "type" in err && err.type === "entity.too.large") {
    status = 413;
    body = { error: { code: "payload_too_large", message: "The request body is too large." } };
  } else if (err && typeof err === "object" && "status" in err && typeof err.status === "number" && err.status >= 400 && err.status < 500) {
    status = err.status;
    body = { error: { code: "bad_request", message: "The request could not be read." } };
  } else if (isDatabaseUnavailable(err)) {
    status = 503;
    req.log?.warn({ err }, "database unavailable");
    if (!res.headersSent) res.set("Retry-After", String(UNAVAILABLE_RETRY_AFTER_SECONDS));
    body = { error: { code: "unavailable", message: `The service is briefly unavailable. Try again in ${UNAVAILABLE_RETRY_AFTER_SECONDS} seconds.` } };
  } else {
    req.log?.error({ err }, "unhandled error");
    body = { error: { code: "internal", message: "Something went wrong on our side. It has been logged." } };
  }
  if (res.headersSent) return;
  res.status(status).json(body);
};

export const apiNotFound: RequestHandler = (_req, res) => {
  res.status(404).json({ error: { code: "not_found", message: "There is no such API route." } });
};
