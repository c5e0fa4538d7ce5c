import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import type { Page } from "playwright-core";
import type { MediaListResponse } from "../../src/shared/schemas/media.ts";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, openAs, type Browser, screenshot, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

let t: TestApp;
const browsers = browserPool();
/** Stories this file published, withdrawn again afterwards so the demo's public pages stay as seeded. */
const published: number[] = [];
beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
});
afterAll(async () => {
  if (t && published.length) {
    const lead = await signIn(t, DEMO.lead);
    for (const id of published) await lead.agent.post(`/api/stories/${id}/withdraw`).set("X-CSRF-Token", lead.csrf);
  }
  await browsers.closeAll();
  await t?.close();
});

const browserFor = (width = 1280): Promise<Browser> => browsers.launch(width);

const signedInPage = (b: Browser, email: string): Promise<Page> => openAs(b.context, t.baseUrl, email);

/** A lead's draft story of one cleared demo photo, saved twice (two revisions). */
async function leadStory(): Promise<{ id: number; title: string }> {
  const lead = await signIn(t, DEMO.lead);
  const items = ((await lead.agent.get(`/api/media?project=${SLUG}&status=ready&sensitivity=cleared&pageSize=100`).expect(200)).body as MediaListResponse).items;
  const photo = items.find((i) => i.altText?.trim());
  if (!photo) throw new Error("the demo library has no cleared photo with alt text");
  const title = `The bulk fuel tank ${Date.now().toString(36)}`;
  const made = await lead.agent
    .post(`/api/projects/${SLUG}/stories`)
    .set("X-CSRF-Token", lead.csrf)
    .send({ title, intro: "The tank is set on its bund.", audience: "public", items: [{ kind: "photo", mediaId: photo.id, caption: "The tank on delivery day" }] })
    .expect(201);
  await lead.agent.patch(`/api/stories/${made.body.id}`).set("X-CSRF-Token", lead.csrf).send({ version: 1, intro: "The double-skinned tank is set on its bund and filled." }).expect(200);
  return { id: made.body.id as number, title };
}

describe("a photo story through the same workflow as updates", () => {
  let story: { id: number; title: string };

  it("a lead compares two revisions, restores the first, and schedules the story on the project's clock; the ticker publishes it when the time comes", async () => {
    story = await leadStory();
    const page = await signedInPage(await browserFor(), DEMO.lead);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/stories/${story.id}`);
    await page.getByRole("heading", { name: story.title, level: 1 }).waitFor();

    // Compare: the words of the introduction that changed between revision 1 and 2.
    const revisions = page.getByTestId("revisions");
    await revisions.getByText("Revision 2").waitFor();
    await revisions.getByRole("button", { name: "Compare with 1" }).click();
    const diff = page.getByTestId("revision-diff");
    await diff.waitFor();
    expect(await diff.locator("ins").allTextContents()).toContain("double-skinned ");
    expect(await diff.textContent()).toContain("Photo: The tank on delivery day");
    await screenshot(page, "story-revision-diff");
    await page.getByRole("dialog", { name: "Compare revisions" }).getByRole("button", { name: /Close/ }).click();

    // Restore revision 1: it comes back as revision 3 and the form shows its text.
    await revisions.getByRole("button", { name: "Restore" }).click();
    await page.getByRole("dialog", { name: "Restore revision 1?" }).getByRole("button", { name: "Restore it" }).click();
    await revisions.getByText("Revision 3").waitFor();
    await revisions.getByText("Restored revision 1").waitFor();
    expect(await page.getByLabel("Introduction").inputValue()).toBe("The tank is set on its bund.");

    // Schedule: the dialog names the project's zone; the story then says when it goes out.
    await page.getByRole("button", { name: "Schedule…" }).click();
    const dialog = page.getByRole("dialog", { name: "Schedule publication" });
    expect(await dialog.getByTestId("schedule-zone").textContent()).toMatch(/^Europe\/London \((GMT|BST)\)$/);
    const day = DateTime.now().setZone("Europe/London").plus({ days: 3 }).toISODate()!;
    await dialog.getByLabel("Date").fill(day);
    await dialog.getByLabel(/^Time/).fill("08:15");
    await screenshot(page, "story-schedule");
    await dialog.getByRole("button", { name: "Schedule" }).click();
    await page.locator('[data-status="scheduled"]').first().waitFor();
    await page.getByTestId("scheduled-for").getByText(/goes out .*08:15 (GMT|BST)/).waitFor();
    await page.getByTestId("publishing-history").locator('[data-action="schedule"]').getByText(/08:15 (GMT|BST)/).waitFor();

    // Source: the IANA time zone database — Europe/London is UTC+0 in winter and UTC+1 in summer;
    // luxon converts the wall-clock time independently of the server.
    const due = DateTime.fromISO(`${day}T08:15`, { zone: "Europe/London" }).toUTC();
    const lead = await signIn(t, DEMO.lead);
    const saved = (await lead.agent.get(`/api/stories/${story.id}`).expect(200)).body as { status: string; scheduledFor: string; intro: string };
    expect(saved).toMatchObject({ status: "scheduled", scheduledFor: due.toJSDate().toISOString(), intro: "The tank is set on its bund." });

    await t.plumbline.publishing.tick(due.minus({ seconds: 1 }).toJSDate());
    expect((await lead.agent.get(`/api/stories/${story.id}`).expect(200)).body.status).toBe("scheduled");
    await t.plumbline.publishing.tick(due.plus({ minutes: 1 }).toJSDate());
    published.push(story.id);
    await page.reload();
    await page.locator('[data-status="published"]').first().waitFor();
    await page.getByTestId("publishing-history").locator('[data-action="publish"]').getByText("scheduler").waitFor();
    expect(errors).toEqual([]);
  });

  it("at phone width the editor shows the schedule, the revisions and the history without sideways scrolling", async () => {
    expect(story).toBeDefined();
    const page = await signedInPage(await browserFor(360), DEMO.lead);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/stories/${story.id}`);
    await page.getByTestId("revisions").getByText("Revision 3").waitFor();
    await page.getByTestId("publishing-history").locator('[data-action="publish"]').waitFor();
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, "story-workflow-360");
    await page.getByTestId("revisions").getByRole("button", { name: "Compare with 2" }).click();
    await page.getByTestId("revision-diff").waitFor();
    await screenshot(page, "story-revision-diff-360");
    expect(errors).toEqual([]);
  });
});
