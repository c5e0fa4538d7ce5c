import { vi } from "vitest";

/** A JSON answer as the API gives it. */
export const jsonAnswer = (status: number, body: unknown) => new Response(JSON.stringify(body), { status, headers: { "Content-Type": "application/json" } });

export interface StubbedCall {
  method: string;
  url: string;
  init: RequestInit;
}

/**
 * Replaces fetch for a component test: the CSRF token route answers "t", every other request
 * goes to `answer`. Unstub in afterEach (`vi.unstubAllGlobals()`).
 */
export function stubFetch(answer: (call: StubbedCall) => Response | Promise<Response>): void {
  vi.stubGlobal(
    "fetch",
    vi.fn(async (url: string, init: RequestInit = {}) => (url === "/api/auth/csrf" ? jsonAnswer(200, { token: "t" }) : answer({ method: init.method ?? "GET", url, init }))),
  );
}
