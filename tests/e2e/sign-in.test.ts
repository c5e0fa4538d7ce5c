import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, DEMO_PASSWORD, startTestApp, type TestApp } from "../helpers/app.ts";
import { launchBrowser, screenshot, watchErrors } from "../helpers/browser.ts";

let t: TestApp;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await t?.close();
});

const landing = { admin: /\/office$/, lead: /\/office$/, marketing: /\/office$/, investor: /\/investors$/ } as const;

describe("signing in through the form, as each demo user", () => {
  for (const role of ["admin", "lead", "marketing", "investor"] as const) {
    it(`${role} signs in and lands in their own area`, async () => {
      const page = await browser.context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${t.baseUrl}/sign-in`);
      await page.getByLabel("E-mail address").fill(DEMO[role]);
      await page.getByLabel("Password").fill(DEMO_PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(landing[role]);
      await expect.poll(() => page.getByRole("button", { name: "Sign out" }).isVisible()).toBe(true);
      await page.getByRole("heading", { level: 1 }).waitFor();
      await screenshot(page, `sign-in-${role}`);
      expect(errors).toEqual([]);
      await page.close();
    });
  }

  it("a wrong password shows the refusal on the form and stays on sign-in", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${t.baseUrl}/sign-in`);
    await page.getByLabel("E-mail address").fill(DEMO.lead);
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect.poll(() => page.getByRole("alert").first().textContent()).toMatch(/do not match/);
    expect(page.url()).toMatch(/\/sign-in$/);
    await page.close();
  });

  it("an investor opening /office sees the refusal page", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${t.baseUrl}/sign-in`);
    await page.getByLabel("E-mail address").fill(DEMO.investor);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/investors$/);
    await page.goto(`${t.baseUrl}/office`);
    await page.getByTestId("refusal").waitFor();
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toMatch(/Not open to your account/);
    await screenshot(page, "investor-refused-office");
    await page.close();
  });

  it("a signed-out visitor sent to /office/users signs in and is taken back there", async () => {
    const fresh = await launchBrowser();
    try {
      const page = await fresh.context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${t.baseUrl}/office/users`);
      await page.waitForURL(/\/sign-in\?next=/);
      await page.getByLabel("E-mail address").fill(DEMO.admin);
      await page.getByLabel("Password").fill(DEMO_PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/office\/users$/);
      await page.getByRole("heading", { name: "Users", level: 1 }).waitFor();
      // The table has loaded, with the admin's own last sign-in shown.
      await page.getByRole("cell", { name: DEMO.admin, exact: true }).waitFor();
      await page.getByText("Active").first().waitFor();
      await page.getByRole("link", { name: "Audit log" }).click();
      await page.getByRole("cell", { name: "Signed in" }).first().waitFor();
      await page.getByRole("link", { name: "Users" }).click();
      // The audit log (whose rows also name the admin) stays on screen until the users page's loader is done.
      await page.waitForURL(/\/office\/users$/);
      await page.getByRole("heading", { name: "Users", level: 1 }).waitFor();
      await page.getByRole("cell", { name: DEMO.admin, exact: true }).waitFor();
      await screenshot(page, "office-users");
      expect(await page.getByRole("alert").count()).toBe(0);
      expect(errors).toEqual([]);
    } finally {
      await fresh.close();
    }
  });

  it("the public home works at phone width (360 px) without sideways scrolling", async () => {
    const phone = await launchBrowser({ width: 360, height: 740 });
    try {
      const page = await phone.context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${t.baseUrl}/projects/aldermere-phase-2`);
      await page.getByRole("heading", { level: 1 }).waitFor();
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, "phone-project-home");
      expect(errors).toEqual([]);
    } finally {
      await phone.close();
    }
  });
});
