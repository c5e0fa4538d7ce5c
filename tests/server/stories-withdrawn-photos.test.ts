/**
 * A photo sent back to review or restricted after its story was published (decision 070, stories):
 * visitors and investors are not shown it — neither the item that holds it, nor its caption, nor the
 * story's cover — rather than an image their browser cannot load. Staff still see the story whole.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, signInAll } from "./posts-fixtures.ts";

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  t = await startTestApp();
  as = await signInAll(t);
});
afterAll(async () => {
  await t?.close();
});

/** A story written and published by the lead in `slug`: its id and address. */
async function publishedStory(slug: string, story: object): Promise<{ id: number; slug: string }> {
  const made = await as.lead.agent.post(`/api/projects/${slug}/stories`).set("X-CSRF-Token", as.lead.csrf).send(story).expect(201);
  await as.lead.agent.post(`/api/stories/${made.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
  return { id: made.body.id as number, slug: made.body.slug as string };
}

interface Item {
  kind: string;
  mediaId?: number;
  beforeMediaId?: number;
  afterMediaId?: number;
  caption: string;
  media?: { sources: { jpeg: Array<{ url: string }> } } | null;
}

describe("a published story whose photo is withdrawn", () => {
  it("leaves that photo's item, caption and cover out for visitors and investors; staff still see them", async () => {
    const project = await createProject(t);
    const hero = await createPhoto(t, project.id);
    const gate = await createPhoto(t, project.id);
    const kept = await createPhoto(t, project.id);
    const then = await createPhoto(t, project.id, { takenAt: "2026-01-12T09:00:00" });
    const now = await createPhoto(t, project.id, { takenAt: "2026-03-02T10:15:00" });
    const made = await publishedStory(project.slug, {
        title: "The secure line goes in",
        intro: "From the gatehouse to the hall doors.",
        audience: "investor",
        items: [
          { kind: "photo", mediaId: hero.id, caption: "The hall doors from the corridor" },
          { kind: "photo", mediaId: gate.id, caption: "Gatehouse camera positions" },
          { kind: "photo", mediaId: kept.id, caption: "Turnstiles at reception" },
          { kind: "pair", area: "Gatehouse", beforeMediaId: then.id, afterMediaId: now.id, caption: "The gatehouse, then and now" },
        ],
    });
    const page = `/api/projects/${project.slug}/stories/${made.slug}`;
    const before = await as.investor.agent.get(page).expect(200);
    expect(before.body.items).toHaveLength(4);
    expect(before.body.cover?.id).toBe(hero.id);

    // Sent back after publication: the cover restricted, one photo and the pair's "now" to review.
    await t.db("media_items").where({ id: hero.id }).update({ sensitivity: "restricted" });
    await t.db("media_items").whereIn("id", [gate.id, now.id]).update({ sensitivity: "unreviewed" });

    const after = await as.investor.agent.get(page).expect(200);
    const items = after.body.items as Item[];
    // Only the item whose photo a browser can still load, and nothing that names the others.
    expect(items.map((i) => i.mediaId)).toEqual([kept.id]);
    const text = JSON.stringify(after.body);
    for (const withdrawn of [hero, gate, now]) for (const url of withdrawn.urls) expect(text).not.toContain(url);
    expect(text).not.toContain("Gatehouse camera positions");
    expect(text).not.toContain("The hall doors from the corridor");
    expect(after.body.cover).toBeNull();
    // Every URL still given loads.
    for (const url of items.flatMap((i) => i.media?.sources.jpeg.map((s) => s.url) ?? [])) await as.investor.agent.get(url).expect(200);
    const list = await as.investor.agent.get(`/api/projects/${project.slug}/stories`).expect(200);
    expect(list.body.find((s: { id: number }) => s.id === made.id).cover).toBeNull();

    // A visitor is not shown the investors' story at all, as before.
    await (await newClient(t)).agent.get(page).expect(404);

    // Staff see the story as it was published, to put it right.
    const staff = await as.lead.agent.get(`/api/stories/${made.id}`).expect(200);
    expect((staff.body.items as Item[]).map((i) => i.mediaId ?? i.afterMediaId)).toEqual([hero.id, gate.id, kept.id, now.id]);
    expect(staff.body.cover?.id).toBe(hero.id);
  });

  it("a public story's visitors get the same: the withdrawn photo's item is left out", async () => {
    const project = await createProject(t);
    const first = await createPhoto(t, project.id);
    const second = await createPhoto(t, project.id);
    const made = await publishedStory(project.slug, { title: "Chillers on the roof", intro: "Lifted on in a day.", audience: "public", items: [{ kind: "photo", mediaId: first.id, caption: "The first lift" }, { kind: "photo", mediaId: second.id, caption: "The crane's outrigger pads" }] });
    await t.db("media_items").where({ id: second.id }).update({ sensitivity: "unreviewed" });
    const visitor = await newClient(t);
    const after = await visitor.agent.get(`/api/projects/${project.slug}/stories/${made.slug}`).expect(200);
    expect((after.body.items as Item[]).map((i) => i.mediaId)).toEqual([first.id]);
    expect(JSON.stringify(after.body)).not.toContain("The crane's outrigger pads");
    expect(after.body.cover?.id).toBe(first.id);
  });
});
