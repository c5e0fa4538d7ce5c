import type { ApiErrorBody } from "#shared/schemas/common.ts";

/** An error answer from the API, in the fixed shape, as a typed exception. */
export class ApiError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly fields: Record<string, string> = {},
    public readonly body: unknown = null,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

/**
 * How requests leave: the browser's fetch to the page's own origin. The server's renderer
 * (src/entry-server.tsx) points it at the app itself, so the same loaders run there as the visitor.
 */
let transport: typeof fetch = (input, init) => fetch(input, init);

/** Sends the API requests through `how` instead (the server's renderer only). */
export function setApiFetch(how: typeof fetch): void {
  transport = how;
}

let csrfToken: string | null = null;
let csrfPromise: Promise<string> | null = null;

async function fetchCsrf(): Promise<string> {
  csrfPromise ??= fetch("/api/auth/csrf", { credentials: "same-origin" })
    .then((r) => r.json() as Promise<{ token: string }>)
    .then((b) => {
      csrfToken = b.token;
      return b.token;
    })
    .finally(() => {
      csrfPromise = null;
    });
  return csrfPromise;
}

/** Forget the token, e.g. after sign-out, when the server starts a new session. */
export function resetCsrf(): void {
  csrfToken = null;
}

type Method = "GET" | "POST" | "PATCH" | "PUT" | "DELETE";

async function send<T>(method: Method, path: string, body?: unknown, retried = false): Promise<T> {
  const headers: Record<string, string> = { Accept: "application/json" };
  const isForm = typeof FormData !== "undefined" && body instanceof FormData;
  if (body !== undefined && !isForm) headers["Content-Type"] = "application/json";
  if (method !== "GET") headers["X-CSRF-Token"] = csrfToken ?? (await fetchCsrf());
  const res = await transport(path, {
    method,
    headers,
    credentials: "same-origin",
    body: body === undefined ? undefined : isForm ? (body as FormData) : JSON.stringify(body),
  });
  if (res.status === 204) return undefined as T;
  const type = res.headers.get("content-type") ?? "";
  const payload: unknown = type.includes("json") ? await res.json() : await res.text();
  if (!res.ok) {
    const err = (payload as ApiErrorBody | null)?.error;
    if (res.status === 403 && err?.code === "csrf" && !retried) {
      csrfToken = null;
      return send<T>(method, path, body, true);
    }
    throw new ApiError(res.status, err?.code ?? "http_error", err?.message ?? `The server answered ${res.status}.`, err?.fields ?? {}, payload);
  }
  return payload as T;
}

/**
 * POSTs JSON and takes a file back (a press kit's zip): the bytes and the file name the server
 * gave in Content-Disposition. An error answer raises ApiError as `send` does.
 */
export async function postForFile(path: string, body: unknown, retried = false): Promise<{ blob: Blob; fileName: string | null }> {
  const res = await transport(path, {
    method: "POST",
    headers: { "Content-Type": "application/json", "X-CSRF-Token": csrfToken ?? (await fetchCsrf()) },
    credentials: "same-origin",
    body: JSON.stringify(body),
  });
  if (!res.ok) {
    const payload: unknown = (res.headers.get("content-type") ?? "").includes("json") ? await res.json() : null;
    const err = (payload as ApiErrorBody | null)?.error;
    if (res.status === 403 && err?.code === "csrf" && !retried) {
      csrfToken = null;
      return postForFile(path, body, true);
    }
    throw new ApiError(res.status, err?.code ?? "http_error", err?.message ?? `The server answered ${res.status}.`, err?.fields ?? {}, payload);
  }
  const named = /filename="([^"]+)"/.exec(res.headers.get("content-disposition") ?? "");
  return { blob: await res.blob(), fileName: named?.[1] ?? null };
}

export const api = {
  get: <T>(path: string) => send<T>("GET", path),
  post: <T>(path: string, body?: unknown) => send<T>("POST", path, body ?? {}),
  patch: <T>(path: string, body: unknown) => send<T>("PATCH", path, body),
  put: <T>(path: string, body: unknown) => send<T>("PUT", path, body),
  delete: <T>(path: string) => send<T>("DELETE", path),
};

/** Query string from an object, skipping empty values. */
export function qs(params: Record<string, string | number | boolean | undefined | null>): string {
  const u = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== "") u.set(k, String(v));
  const s = u.toString();
  return s ? `?${s}` : "";
}

/** One page of a list, and how many there are in all. */
export interface Page<T> {
  items: T[];
  total: number;
}

/** How many pages `total` items fill at `pageSize` a page; an empty list still shows one. */
export function pageCount(total: number, pageSize: number): number {
  return Math.max(1, Math.ceil(total / pageSize));
}

/**
 * GET one page of a list whose total comes in `X-Total-Count` (the posts contract), `query` its
 * filters; page 1 is left out of the address, so the first page and the plain list are one read.
 * `api.get` returns bodies only, so this reads the header itself and raises the same error type.
 */
export async function getPage<T>(path: string, { page, ...query }: Record<string, string | number | boolean | undefined | null> & { page?: number } = {}): Promise<Page<T>> {
  const res = await transport(`${path}${qs({ ...query, page: page && page > 1 ? page : undefined })}`, { headers: { Accept: "application/json" }, credentials: "same-origin" });
  const body: unknown = (res.headers.get("content-type") ?? "").includes("json") ? await res.json() : null;
  if (!res.ok) {
    const err = (body as ApiErrorBody | null)?.error;
    throw new ApiError(res.status, err?.code ?? "http_error", err?.message ?? `The server answered ${res.status}.`, err?.fields ?? {}, body);
  }
  const items = Array.isArray(body) ? (body as T[]) : ((body as { items?: T[] } | null)?.items ?? []);
  const header = res.headers.get("x-total-count");
  const total = header !== null && Number.isFinite(Number(header)) ? Number(header) : ((body as { total?: number } | null)?.total ?? items.length);
  return { items, total };
}
