import type { ApiErrorBody } from "#shared/schemas/common.ts";
import type { MediaUploadResult, RefusedFile } from "#shared/schemas/media.ts";

/** An upload the server refused, with the message meant for the file it names. */
export class UploadRefused extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly files: RefusedFile[] = [],
  ) {
    super(message);
    this.name = "UploadRefused";
  }
}

let csrf: Promise<string> | null = null;

function csrfToken(fresh = false): Promise<string> {
  if (fresh || !csrf) {
    csrf = fetch("/api/auth/csrf", { credentials: "same-origin" })
      .then((r) => r.json() as Promise<{ token: string }>)
      .then((b) => b.token);
    csrf.catch(() => (csrf = null));
  }
  return csrf;
}

function send(file: File, project: string, token: string, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    // XMLHttpRequest, not fetch: only it reports upload progress in every browser.
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/media?project=${encodeURIComponent(project)}`);
    xhr.setRequestHeader("X-CSRF-Token", token);
    xhr.setRequestHeader("Accept", "application/json");
    xhr.responseType = "json";
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => resolve({ status: xhr.status, body: xhr.response as unknown });
    xhr.onerror = () => reject(new UploadRefused(0, "network", "The connection failed before the photo was sent. Try again."));
    xhr.onabort = () => reject(new UploadRefused(0, "aborted", "The upload was cancelled."));
    signal?.addEventListener("abort", () => xhr.abort(), { once: true });
    const form = new FormData();
    form.append("files", file, file.name);
    xhr.send(form);
  });
}

/**
 * Sends one photo in its own request, so each file has its own progress and its own answer
 * (the server refuses a request as a whole; one file per request keeps the good ones).
 * Resolves with the server's answer for the file: processing, or a duplicate of an existing one.
 */
export async function uploadPhoto(file: File, project: string, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<MediaUploadResult> {
  let res = await send(file, project, await csrfToken(), onProgress, signal);
  const error = (res.body as ApiErrorBody | null)?.error;
  if (res.status === 403 && error?.code === "csrf") res = await send(file, project, await csrfToken(true), onProgress, signal);
  if (res.status === 201 && Array.isArray(res.body)) return (res.body as MediaUploadResult[])[0]!;
  const e = (res.body as (ApiErrorBody & { error: { files?: RefusedFile[] } }) | null)?.error;
  const own = e?.files?.[0];
  throw new UploadRefused(res.status, e?.code ?? "http_error", own?.message ?? e?.message ?? `The server answered ${res.status}.`, e?.files ?? []);
}
