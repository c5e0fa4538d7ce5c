import { describe, expect, it } from "vitest";
import { DEMO } from "../helpers/app.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";
import { binary, pageTexts } from "./documents-fixtures.ts";

const f = useAppAsEveryRole();
const SLUG = "aldermere-phase-2";
type Doc = { id: number; title: string; category: string; audience: string; versions: Array<{ number: number }>; newSinceLastVisit: boolean; organisations: Array<{ id: number }> };

describe("the demo's document library", () => {
  it("has six invented documents across the categories (and the two issued monthly reports), one internal, a technical note with two versions, and the investor's view history", async () => {
    const all = (await f.as.lead.agent.get(`/api/projects/${SLUG}/documents`).expect(200)).body as Doc[];
    // The reports seed issues the last two monthly reports into the library as well.
    expect(all).toHaveLength(8);
    expect(all.filter((d) => d.category === "monitoring_report")).toHaveLength(4);
    expect(all.filter((d) => d.category === "certificate")).toHaveLength(2);
    expect(all.filter((d) => d.category === "lender_pack")).toHaveLength(1);
    expect(all.filter((d) => d.audience === "internal").map((d) => d.category)).toEqual(["certificate"]);
    expect(all.find((d) => d.category === "technical")!.versions.map((v) => v.number)).toEqual([2, 1]);

    const history = (await f.as.investor.agent.get(`/api/projects/${SLUG}/my-document-views`).expect(200)).body as Array<{ email: string }>;
    expect(history.length).toBeGreaterThanOrEqual(4);
    expect(new Set(history.map((h) => h.email))).toEqual(new Set([DEMO.investor]));

    const seen = (await f.as.investor.agent.get(`/api/projects/${SLUG}/documents`).expect(200)).body as Doc[];
    expect(seen.every((d) => d.audience === "investor")).toBe(true);
    expect(seen.length).toBeGreaterThanOrEqual(4);
    // A stamped copy of a demo document names the demo investor on its pages.
    const technical = seen.find((d) => d.category === "technical")!;
    const res = await f.as.investor.agent.get(`/api/documents/${technical.id}/file`).buffer(true).parse(binary).expect(200);
    for (const text of await pageTexts(res.body as Buffer)) expect(text).toContain(DEMO.investor);
  });
});
