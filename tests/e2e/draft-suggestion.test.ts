import { describe, expect, it } from "vitest";
import { DraftSuggestionAnswerSchema } from "../../src/shared/schemas/writing-help.ts";
import { DEMO, signIn } from "../helpers/app.ts";
import { openAs, screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

const { app, browsers } = useBrowserApp();

describe("starting an update from the programme's suggestion", () => {
  it("a marketing user at 1280 starts an investor update from the suggestion and sees it pre-filled in the editor", async () => {
    // What the page should offer: the demo's investor suggestion as the API gives it.
    const marketing = await signIn(app(), DEMO.marketing);
    const expected = DraftSuggestionAnswerSchema.parse((await marketing.agent.get(`/api/projects/${SLUG}/draft-suggestion?audience=investor`).expect(200)).body).suggestion;
    expect(expected, "the demo's last weeks give investors something to read").not.toBeNull();

    const page = await openAs((await browsers.launch(1280)).context, app().baseUrl, DEMO.marketing);
    const errors = watchErrors(page);
    await page.getByRole("link", { name: "Updates", exact: true }).click();
    await page.getByRole("heading", { name: "Updates", level: 1 }).waitFor();
    await page.getByRole("link", { name: "New update" }).click();
    await page.getByRole("heading", { name: "New update", level: 1 }).waitFor();

    const panel = page.getByTestId("draft-suggestion");
    await panel.getByLabel("Update for").selectOption("investor");
    await expect.poll(() => panel.getByTestId("suggested-title").textContent()).toBe(expected!.title);
    for (const g of expected!.groups) await panel.getByRole("heading", { name: g.heading }).waitFor();
    await screenshot(page, "draft-suggestion-offered-1280");

    await panel.getByRole("button", { name: "Start from this" }).click();
    await page.waitForURL(/\/office\/updates\/\d+/);
    await expect.poll(() => page.getByLabel("Title", { exact: true }).inputValue()).toBe(expected!.title);
    const body = page.getByRole("textbox", { name: "Body of the update" });
    await expect.poll(() => body.textContent()).toContain(expected!.groups[0]!.heading);
    const movedMilestones = new Set(expected!.groups.flatMap((g) => g.moves.flatMap((m) => (m.milestoneId === null ? [] : [m.milestoneId]))));
    await expect.poll(() => page.getByTestId("editor-milestone").count()).toBe(movedMilestones.size);
    await expect.poll(() => page.getByTestId("editor-image").count()).toBe(expected!.photos.length);
    // Each photo's alt text came from its caption: marked for the writer to check.
    await expect.poll(() => page.getByTestId("alt-to-check").count()).toBe(expected!.photos.filter((p) => p.altCandidate).length);
    // A draft: nothing published, and the suggestion is gone once the update exists.
    expect(await page.getByTestId("draft-suggestion").count()).toBe(0);
    await screenshot(page, "draft-suggestion-prefilled-1280");
    expect(errors).toEqual([]);
  });
});
