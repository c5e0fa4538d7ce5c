import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, startTestApp, type TestApp } from "../helpers/app.ts";
import { launchBrowser, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

let t: TestApp;
let desk: Awaited<ReturnType<typeof launchBrowser>>;

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  desk = await launchBrowser();
});
afterAll(async () => {
  await desk?.close();
  await t?.close();
});

describe("the site office's Digests page", () => {
  it("shows upcoming runs and the history, and previews what a chosen subscriber would get now", async () => {
    const page = await desk.context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.marketing, /\/office$/);

    await page.getByRole("link", { name: "Digests" }).click();
    await page.getByRole("heading", { level: 1, name: "Digests" }).waitFor();
    await page.getByRole("heading", { name: "Upcoming runs" }).waitFor();
    // Upcoming: the next weekly run is on a Monday at 08:00 local.
    await page.getByText(/^Weekly/).first().waitFor();
    // The seeded history: finished runs with their counts.
    const history = page.locator("table");
    await history.waitFor();
    expect(await history.getByText("Finished").count()).toBeGreaterThan(0);

    // Preview the digest of a confirmed demo subscriber.
    const select = page.getByLabel("Subscriber");
    await select.waitFor();
    const value = await select.locator("option").nth(1).getAttribute("value");
    expect(value).toBeTruthy();
    await select.selectOption(value!);
    const subject = page.getByTestId("digest-preview-subject");
    await subject.waitFor();
    expect(await subject.textContent()).toMatch(/Aldermere Campus, Phase 2/);
    const frame = page.frameLocator('iframe[title="Digest preview"]');
    await frame.getByText("Unsubscribe").waitFor();
    await screenshot(page, "digests-page");
    expect(errors).toEqual([]);
  });
});
