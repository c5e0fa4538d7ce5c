import { describe, expect, it } from "vitest";
import { DEMO } from "../helpers/app.ts";
import { screenshot, signInAs, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const { app, browsers } = useBrowserApp();

describe("the level from which a unit carries its load, in the office", () => {
  it("the lead moves it to L5 at 375 px, the plant key follows, the administrator's audit log says so in words, and it goes back to L4", async () => {
    const t = app();
    const page = await (await browsers.launch(375, 812)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.goto(`${t.baseUrl}/office/facility?project=${SLUG}`);
    const form = page.getByRole("form", { name: "When a unit carries its load" });
    const level = form.getByLabel("A unit carries its load from");
    await level.waitFor();
    expect(await level.inputValue()).toBe("4");
    const save = form.getByRole("button", { name: "Save level" });
    expect(await save.isDisabled()).toBe(true);
    await level.selectOption("5");
    await save.click();
    await page.getByText("heavy frame: carries load (from L5)").waitFor();
    expect(Number((await t.db("projects").where({ slug: SLUG }).first("available_from_level")).available_from_level)).toBe(5);
    await form.scrollIntoViewIfNeeded();
    await screenshot(page, "facility-carry-load-phone");

    // The audit log is the administrator's.
    const admin = await (await browsers.launch(1280, 900)).context.newPage();
    await signInAs(admin, t.baseUrl, DEMO.admin, /\/office$/);
    await admin.goto(`${t.baseUrl}/office/audit`);
    await admin.getByRole("cell", { name: "Commissioning level for carrying load changed" }).first().waitFor();
    expect(await admin.getByText("facility_settings_changed").count()).toBe(0);
    await admin.close();

    await page.goto(`${t.baseUrl}/office/facility?project=${SLUG}`);
    await level.selectOption("4");
    await save.click();
    await page.getByText("heavy frame: carries load (from L4)").waitFor();
    expect(Number((await t.db("projects").where({ slug: SLUG }).first("available_from_level")).available_from_level)).toBe(4);
    expect(errors).toEqual([]);
    await page.close();
  });
});
