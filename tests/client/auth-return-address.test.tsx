import { screen, waitFor } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import { OfficeLayout } from "../../src/app/layouts/office-layout.tsx";
import { safeReturnAddress } from "../../src/features/auth/return-address.ts";
import { OutboxMessagePage, OutboxPage } from "../../src/features/outbox/routes.tsx";
import { sessionKeys } from "../../src/lib/session.ts";
import { renderWithApp } from "./render.tsx";

describe("safeReturnAddress: where sign-in may send you back to", () => {
  it.each([
    ["//evil.example", "another host, scheme-relative"],
    ["/\\evil.example", "a backslash the browser reads as a slash"],
    ["/%5Cevil.example", "an encoded backslash"],
    ["/%5cevil.example", "an encoded backslash, lower case"],
    ["/%2Fevil.example", "an encoded slash"],
    ["/%252Fevil.example", "a twice-encoded slash"],
    ["/\t/evil.example", "a tab the browser drops"],
    ["/\n/evil.example", "a newline the browser drops"],
    ["/office\u0000", "a NUL"],
    ["/%0a/evil.example", "an encoded newline"],
    ["/%E0%A4%A", "a malformed escape"],
    ["https://evil.example/office", "an absolute URL"],
    ["javascript:alert(1)", "a script URL"],
    ["JaVaScRiPt:alert(1)", "a script URL in mixed case"],
    ["office", "a relative path"],
    [" /office", "a leading space"],
    ["", "nothing"],
  ])("refuses %j (%s)", (next) => {
    expect(safeReturnAddress(next)).toBeNull();
  });

  it.each([["/office/programme?x=1"], ["/office"], ["/investors/projects/aldermere-phase-2#risks"], ["/office/outbox?to=lead%40kestrel.example"]])("accepts the same-site path %j unchanged", (next) => {
    expect(safeReturnAddress(next)).toBe(next);
  });

  it("refuses null and undefined", () => {
    expect(safeReturnAddress(null)).toBeNull();
    expect(safeReturnAddress(undefined)).toBeNull();
  });
});

const user = (role: "admin" | "lead" | "marketing") => ({ id: 1, email: `${role}@kestrel.example`, name: "Kim Example", role });

describe("the outbox in the site office", () => {
  afterEach(() => vi.restoreAllMocks());

  it.each([["lead"], ["marketing"]] as const)("is not in the navigation of a %s, and is for an admin", (role) => {
    const { unmount } = renderWithApp(<OfficeLayout />, { data: [[sessionKeys.me(), user(role)]] });
    expect(screen.getByRole("link", { name: "Programme" })).toBeTruthy();
    expect(screen.queryByRole("link", { name: "Outbox" })).toBeNull();
    unmount();
    renderWithApp(<OfficeLayout />, { data: [[sessionKeys.me(), user("admin")]] });
    expect(screen.getByRole("link", { name: "Outbox" })).toBeTruthy();
  });

  it.each([["lead"], ["marketing"]] as const)("reached by a %s, shows a refusal and asks the server for no message", async (role) => {
    const fetchSpy = vi.spyOn(globalThis, "fetch");
    const { unmount } = renderWithApp(<OutboxPage />, { data: [[sessionKeys.me(), user(role)]] });
    await waitFor(() => expect(screen.getByTestId("refusal")).toBeTruthy());
    expect(screen.getByText(/Administrators only/)).toBeTruthy();
    unmount();
    renderWithApp(<OutboxMessagePage />, { path: "/office/outbox/:id", route: "/office/outbox/7", data: [[sessionKeys.me(), user(role)]] });
    await waitFor(() => expect(screen.getByTestId("refusal")).toBeTruthy());
    expect(fetchSpy.mock.calls.filter(([url]) => String(url).includes("/api/outbox"))).toHaveLength(0);
  });
});
