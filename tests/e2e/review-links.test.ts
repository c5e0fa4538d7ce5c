import AxeBuilder from "@axe-core/playwright";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO, signIn } from "../helpers/app.ts";
import { openAs, screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const COMMENT = "The second chiller is not piped yet: say “set on its plinth” instead.";

const { app, browsers } = useBrowserApp();

/** axe-core's WCAG 2.x A/AA findings on the page as it stands. */
async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"]).analyze();
  return result.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}

describe("a review link, from the editor to an outside reviewer and back", () => {
  it("marketing makes a link; a reviewer without an account reads the draft at 375 px and answers; the author sees the answer in the editor", async () => {
    const t = app();
    const marketing = await signIn(t, DEMO.marketing);
    const title = `Chillers set on their plinths ${Date.now().toString(36)}`;
    const created = await marketing.agent
      .post(`/api/projects/${SLUG}/posts`)
      .set("X-CSRF-Token", marketing.csrf)
      .send({ title, summary: "All five chillers are on their plinths.", body: { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "The five chillers arrived this month." }] }] }, audience: "public" })
      .expect(201);
    const postId = created.body.id as number;

    // The author makes the link in the editor's "Review links" panel; the URL is shown once.
    const office = await browsers.launch(1280, 900);
    const editor = await openAs(office.context, t.baseUrl, DEMO.marketing, /\/office$/);
    const officeErrors = watchErrors(editor);
    await editor.goto(`${t.baseUrl}/office/updates/${postId}?project=${SLUG}`);
    const form = editor.getByRole("form", { name: "Make a review link" });
    await form.getByLabel("Reviewer's name").fill("Rowan Pike");
    await form.getByLabel("Reviewer's e-mail").fill("rowan.pike@example.test");
    await form.getByLabel("Organisation (optional)").fill("Harbour Communications");
    await form.getByRole("button", { name: "Make the link" }).click();
    const url = await editor.getByTestId("review-link-url").inputValue();
    expect(url).toMatch(new RegExp(`^${t.baseUrl}/review/[A-Za-z0-9_.-]+$`));

    // The reviewer: another browser, a phone's width, never signed in.
    const phone = await browsers.launch(375, 740);
    const page = await phone.context.newPage();
    const errors = watchErrors(page);
    const answer = await page.goto(url);
    expect(answer?.headers()["x-robots-tag"]).toBe("noindex");
    await page.getByRole("heading", { name: title }).waitFor();
    const banner = page.getByTestId("draft-banner");
    expect(await banner.textContent()).toContain("Draft — not for publication");
    expect(await banner.evaluate((el) => getComputedStyle(el).position)).toBe("sticky");
    expect(await page.locator('meta[name="robots"][content="noindex"]').count()).toBeGreaterThan(0);
    expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBeLessThanOrEqual(0);

    await page.getByLabel("Needs changes").check();
    await page.getByLabel("Comment (optional)").fill(COMMENT);
    await page.getByRole("button", { name: "Send my answer" }).click();
    await page.getByText("✓ Thank you: your answer reached the team.").waitFor();
    // Scrolled to the answer, the banner is still on screen.
    expect(await banner.evaluate((el) => el.getBoundingClientRect().top)).toBeGreaterThanOrEqual(0);
    expect(await banner.evaluate((el) => el.getBoundingClientRect().bottom)).toBeLessThanOrEqual(740);
    await screenshot(page, "review-link-reviewer-375");
    expect(await axeViolations(page)).toEqual([]);
    expect(errors).toEqual([]);

    // The author sees it in the editor.
    await editor.reload();
    const answers = editor.getByRole("list", { name: "Answers from Rowan Pike" });
    await answers.waitFor();
    expect(await answers.textContent()).toContain("▲ Needs changes");
    expect(await answers.textContent()).toContain(COMMENT);
    await answers.scrollIntoViewIfNeeded();
    await screenshot(editor, "review-link-editor-answer");
    expect(officeErrors).toEqual([]);

    // Withdrawn, the same link shows a clear page and never the draft.
    await editor.getByRole("button", { name: "Withdraw this link" }).click();
    await editor.getByText("✕ Withdrawn").waitFor();
    await page.goto(url);
    await page.getByRole("heading", { name: "This review link has been withdrawn" }).waitFor();
    expect(await page.getByText(title).count()).toBe(0);
    expect(await page.getByTestId("draft-banner").count()).toBe(1);
    await screenshot(page, "review-link-withdrawn-375");
    expect(await axeViolations(page)).toEqual([]);
  });
});
