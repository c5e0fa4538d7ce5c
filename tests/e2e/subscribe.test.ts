import { DateTime } from "luxon";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, DEMO_PASSWORD, lastMailId, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";
import { launchBrowser, screenshot, watchErrors } from "../helpers/browser.ts";

let t: TestApp;
let phone: Awaited<ReturnType<typeof launchBrowser>>;
let desk: Awaited<ReturnType<typeof launchBrowser>>;
const SLUG = "aldermere-phase-2";

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  phone = await launchBrowser({ width: 360, height: 780 });
  desk = await launchBrowser();
});
afterAll(async () => {
  await phone?.close();
  await desk?.close();
  await t.db("rate_limit_hits").where("key", "like", "subscribe-%").orWhere("key", "like", "enquiry-%").delete();
  await t?.close();
});

/** The path of a link in an e-mail (the app's PUBLIC_URL is not this test server's address). */
function pathIn(text: string, prefix: string): string {
  const m = text.match(new RegExp(`https?://[^/\\s]+(/${prefix}/[A-Za-z0-9_.-]+)`));
  if (!m) throw new Error(`no /${prefix}/ link in:\n${text}`);
  return m[1]!;
}

describe("a visitor subscribes, confirms from the e-mail and sets preferences (phone width)", () => {
  it("subscribe form → confirmation page → Confirm subscription → preferences page", async () => {
    const page = await phone.context.newPage();
    const errors = watchErrors(page);
    const email = `visitor-${Date.now().toString(36)}@example.org`;

    await page.goto(`${t.baseUrl}/projects/${SLUG}/subscribe`);
    await page.getByRole("heading", { level: 1, name: /Follow Aldermere Campus, Phase 2/ }).waitFor();
    await page.getByTestId("consent-text").waitFor();
    await page.getByLabel("E-mail address").fill(email);
    await page.getByLabel("Your name").fill("Agnes Pemberton");
    await page.getByLabel("Organisation (optional)").fill("Aldermere Residents' Association");
    await page.getByLabel("Your interest").selectOption("neighbour");
    await page.getByLabel("How often").selectOption("weekly");
    await page.getByLabel("Only the areas and systems I choose").check();
    await page.getByLabel("Cooling").check();
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, "subscribe-form-phone");
    const before = await lastMailId(t);
    await page.getByRole("button", { name: "Subscribe" }).click();
    await page.getByTestId("subscribe-done").waitFor();
    expect(await page.getByTestId("subscribe-done").textContent()).toMatch(/Check your inbox/);
    expect(await t.db("subscribers").where({ email }).first()).toMatchObject({ status: "pending", interest: "neighbour" });

    // The confirmation link from the e-mail in the sink.
    const mail = await waitForMail(t, email, before);
    const confirmPath = pathIn(mail.text, "subscriptions/confirm");
    await page.goto(`${t.baseUrl}${confirmPath}`);
    const button = page.getByRole("button", { name: "Confirm subscription", exact: true });
    await button.waitFor();
    // Opening the page confirmed nothing.
    expect((await t.db("subscribers").where({ email }).first()).status).toBe("pending");
    await screenshot(page, "subscribe-confirm-page");
    await button.click();
    await page.getByRole("heading", { level: 1, name: "Subscription confirmed" }).waitFor();
    expect((await t.db("subscribers").where({ email }).first()).status).toBe("confirmed");

    // The preferences page, reached from the confirmation, as from every e-mail.
    await page.getByRole("link", { name: "Choose topics and frequency" }).click();
    await page.getByRole("heading", { level: 1, name: "Your preferences" }).waitFor();
    await expect.poll(() => page.getByLabel("Cooling").isChecked()).toBe(true);
    await page.getByLabel("How often").selectOption("monthly");
    await page.getByLabel("Power").check();
    await page.getByRole("button", { name: "Save preferences" }).click();
    await page.getByText("Preferences saved").waitFor();
    const row = await t.db("subscribers").where({ email }).first();
    expect(row.frequency).toBe("monthly");
    expect(JSON.parse(row.topics).systems).toEqual(["cooling", "power"]);
    const overflowPrefs = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflowPrefs).toBeLessThanOrEqual(0);
    await screenshot(page, "subscribe-preferences-page");

    // The welcome e-mail's one-click link opens a page with the button; the GET leaves the subscription alone.
    const welcome = await waitForMail(t, email, mail.id);
    await page.goto(`${t.baseUrl}${pathIn(welcome.text, "u")}`);
    await page.getByRole("button", { name: "Unsubscribe" }).waitFor();
    expect((await t.db("subscribers").where({ email }).first()).status).toBe("confirmed");
    await page.getByRole("button", { name: "Unsubscribe" }).click();
    await page.getByRole("heading", { level: 1, name: "You are unsubscribed" }).waitFor();
    expect((await t.db("subscribers").where({ email }).first()).status).toBe("unsubscribed");
    expect(errors).toEqual([]);
    await page.close();
  });
});

describe("a prospect asks for a site visit", () => {
  it("shows the site rules and the hazard caution, sends the request, and marketing is e-mailed", async () => {
    const page = await phone.context.newPage();
    const errors = watchErrors(page);
    const email = `prospect-${Date.now().toString(36)}@example.com`;
    await page.goto(`${t.baseUrl}/projects/${SLUG}/enquire`);
    await page.getByRole("heading", { level: 1, name: "Make an enquiry" }).waitFor();
    expect(await page.getByTestId("site-rules").count()).toBe(0);
    await page.getByLabel("A site visit").check();
    const rules = page.getByTestId("site-rules");
    await rules.waitFor();
    const text = (await rules.textContent()) ?? "";
    expect(text).toMatch(/construction site is hazardous/);
    expect(text).toMatch(/induction/);
    expect(text).toMatch(/protective equipment/);
    expect(text).toMatch(/escorted by site staff at all times/);
    expect(text).toMatch(/no photographs without permission/);

    const inTwoWeeks = DateTime.now().setZone("Europe/London").plus({ days: 14 }).toISODate()!;
    await page.getByLabel("Preferred date 1").fill(inTwoWeeks);
    await page.getByLabel("Number of people").fill("2");
    await page.getByLabel("Your name").fill("Imogen Saltmarsh");
    await page.getByLabel("E-mail address").fill(email);
    await page.getByLabel("Organisation (optional)").fill("Corrow Analytics");
    await page.getByRole("button", { name: "Send the enquiry" }).click();
    // The rules must be accepted first.
    await page.getByText("confirm that you have read the site rules").waitFor();
    await page.getByLabel(/I have read the site rules/).check();
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, "enquiry-site-visit-phone");
    const before = await lastMailId(t);
    await page.getByRole("button", { name: "Send the enquiry" }).click();
    await page.getByTestId("enquiry-done").waitFor();
    const row = await t.db("enquiries").where({ email }).first();
    expect(row).toMatchObject({ kind: "visit", party_size: 2, status: "new" });
    expect(JSON.parse(row.preferred_dates)).toEqual([inTwoWeeks]);
    const note = await waitForMail(t, DEMO.marketing, before);
    expect(note.subject).toMatch(/New enquiry \(site visit\): 2 on/);
    expect(errors).toEqual([]);
    await page.close();
  });
});

describe("marketing works the lists in the site office", () => {
  it("filters the subscribers table and opens an enquiry", async () => {
    const project = await t.db("projects").where({ slug: SLUG }).first("id");
    const enquirer = `Lucian Hartigan ${Date.now().toString(36)}`;
    await t.db("enquiries").insert({ project_id: project.id, kind: "capacity", name: enquirer, email: "lucian.hartigan@example.net", organisation: "Corrow Analytics", racks: 8, kw_per_rack: 12, needed_by: "2027-09-01" });
    const page = await desk.context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/sign-in?next=/office/subscribers`);
    await page.getByLabel("E-mail address").fill(DEMO.marketing);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByRole("heading", { level: 1, name: "Subscribers" }).waitFor();
    await page.getByRole("link", { name: "Enquiries" }).waitFor();
    await page.getByRole("cell", { name: /Rowan Achterberg/ }).first().waitFor();
    await page.getByLabel("Interest").selectOption("press");
    await page.getByRole("cell", { name: /Wren Delacroix/ }).waitFor();
    await expect.poll(() => page.getByRole("cell", { name: /Rowan Achterberg/ }).count()).toBe(0);
    await screenshot(page, "office-subscribers");

    await page.getByRole("link", { name: "Enquiries" }).click();
    await page.getByRole("heading", { level: 1, name: "Enquiries" }).waitFor();
    await page.getByRole("button", { name: `Open the enquiry from ${enquirer}` }).click();
    await page.getByText("8 racks at 12 kW").first().waitFor();
    await page.getByRole("heading", { level: 2, name: enquirer }).waitFor();
    await page.getByLabel("Status", { exact: true }).last().selectOption("contacted");
    await page.getByLabel("Notes").fill("Rang back; induction booked.");
    await page.getByRole("button", { name: "Save", exact: true }).click();
    await page.getByText("Enquiry saved").waitFor();
    const row = await t.db("enquiries").where({ name: enquirer }).first();
    expect(row).toMatchObject({ status: "contacted", notes: "Rang back; induction booked." });
    await screenshot(page, "office-enquiries");
    expect(errors).toEqual([]);
    await page.close();
  });
});
