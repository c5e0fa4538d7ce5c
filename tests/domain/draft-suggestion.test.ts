import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { MAX_SUGGESTED_PHOTOS, suggestDraft, type DraftSuggestionInput, type MilestoneMoveEvent, type PhotoCandidate } from "../../src/shared/domain/draft-suggestion.ts";

// Common practice (no published source): the suggestion's rules are the product's own (issue #15
// item 2, decision 061), checked on invented examples of the Aldermere Campus Phase 2 scenario.
const window = { since: "2026-11-01T09:00:00.000Z", until: "2026-11-29T09:00:00.000Z", firstDay: "2026-11-01", lastDay: "2026-11-29" };
const nothing: DraftSuggestionInput = { audience: "public", ...window, milestones: [], facility: [], record: [], photos: [] };

const milestone = (over: Partial<MilestoneMoveEvent> = {}): MilestoneMoveEvent => ({
  milestoneId: 11, name: "HD-1 energised", audience: "public", area: "Hall 2A", system: "power", kind: "later", days: 12, from: "2027-01-03", to: "2027-01-15", ...over,
});
const photo = (over: Partial<PhotoCandidate> = {}): PhotoCandidate => ({
  mediaId: 1, caption: "Chillers lifted onto the roof of Hall 2A", altText: null, takenAt: "2026-11-10T10:00:00", cleared: true, tags: { areas: ["Hall 2A"], systems: [], milestones: [] }, thumbUrl: "/media/v/a.jpg", ...over,
});

describe("suggestDraft", () => {
  it("suggests nothing when nothing happened since the last published update", () => {
    expect(suggestDraft(nothing)).toBeNull();
    // Photos alone are no news: nothing moved that they could show.
    expect(suggestDraft({ ...nothing, photos: [photo()] })).toBeNull();
  });

  it("groups the moves under headings and suggests a title from the first of them", () => {
    const s = suggestDraft({
      ...nothing,
      milestones: [milestone()],
      facility: [{ item: { kind: "units_commissioned", name: "Hall 2A chillers", units: ["CH-1", "CH-2"], now: "N" }, topics: { areas: ["Hall 2A"], systems: ["cooling"] } }],
    })!;
    expect(s.groups.map((g) => g.heading)).toEqual(["Plant commissioned", "Forecasts moved"]);
    expect(s.title).toBe("Hall 2A chillers: 2 units commissioned, HD-1 energised forecast 12 days later");
    expect(s.groups[1]!.moves[0]).toMatchObject({ kind: "forecast_moved", milestoneId: 11, days: 12, detail: "forecast moved 12 days later, to 15 January 2027" });
    expect(s.milestoneIds).toEqual([11]);
  });

  it("writes its dates as the update's readers read them, never as ISO", () => {
    const s = suggestDraft({
      ...nothing,
      milestones: [milestone({ milestoneId: 12, name: "Roof watertight", kind: "completed", days: null, to: "2026-11-12" })],
      facility: [{ item: { kind: "block_forecast_moved", name: "Hall 2A", from: "2027-04-16", to: "2027-05-07", days: 21 }, topics: { areas: ["Hall 2A"], systems: [] } }],
    })!;
    const details = s.groups.flatMap((g) => g.moves.map((m) => m.detail));
    expect(details).toEqual(["completed on 12 November 2026", "ready date moved 21 days later, to 7 May 2027"]);
    // The words carry no ISO date (the moves' `at` stays ISO: it orders them, it is not shown).
    expect([s.title, ...details].join(" ")).not.toMatch(/\d{4}-\d{2}-\d{2}/);
  });

  it("leads its title with the news (work done, space ready, plant in service) and names each subject once", () => {
    const fans = { areas: ["Hall 2A"], systems: ["cooling"] };
    const s = suggestDraft({
      ...nothing,
      milestones: [milestone({ milestoneId: 21, name: "Chillers delivered and set", days: 39, to: "2027-01-15" })],
      facility: [
        { item: { kind: "system_label", name: "Supply fans", from: "short by 6", to: "short by 5", design: "N+2", reachedDesign: false }, topics: fans },
        { item: { kind: "units_commissioned", name: "Supply fans", units: ["Fan 1"], now: null }, topics: fans },
        { item: { kind: "block_forecast_moved", name: "Hall 2A", from: "2027-04-16", to: "2027-05-07", days: 21 }, topics: { areas: ["Hall 2A"], systems: [] } },
      ],
    })!;
    // "Supply fans now short by 5" is a line of the body, not a headline; the fans are named once.
    expect(s.title).toBe("Hall 2A ready for service 21 days later, Supply fans: 1 unit commissioned and 2 more");
    // A system reaching its design level is news.
    const reached = suggestDraft({ ...nothing, facility: [{ item: { kind: "system_label", name: "Supply fans", from: "N+1", to: "N+2", design: "N+2", reachedDesign: true }, topics: fans }] })!;
    expect(reached.title).toBe("Supply fans reached N+2");
    // With nothing else to tell, the relabelling still gives the title.
    const only = suggestDraft({ ...nothing, facility: [{ item: { kind: "system_label", name: "Supply fans", from: "short by 6", to: "short by 5", design: "N+2", reachedDesign: false }, topics: fans }] })!;
    expect(only.title).toBe("Supply fans now short by 5");
  });

  it("names a finished milestone as the event it is, and leaves the bracketed detail to the body", () => {
    const done = (milestoneId: number, name: string) => milestone({ milestoneId, name, kind: "completed", days: null, to: "2026-11-12" });
    const title = (...names: string[]) => suggestDraft({ ...nothing, milestones: names.map((n, i) => done(i + 1, n)) })!.title;
    expect(title("HV switchgear and transformers energised")).toBe("HV switchgear and transformers energised");
    expect(title("Generators delivered and set (2 + 1 × 1,250 kVA)")).toBe("Generators delivered and set");
    expect(title("Steel frame topped out")).toBe("Steel frame topped out");
    expect(title("Hall 2A ready for service (48 racks, 480 kW)")).toBe("Hall 2A ready for service");
    expect(title("Hall 2A raised floor, containment and busbar")).toBe("Hall 2A raised floor, containment and busbar complete");
    expect(title("L5 integrated systems test (Hall 2A and HD-1)", "Steel frame topped out")).toBe("L5 integrated systems test complete, Steel frame topped out");
    const moved = suggestDraft({ ...nothing, milestones: [milestone({ name: "Hall 2A ready for service (48 racks, 480 kW)", days: 14 })] })!;
    expect(moved.title).toBe("Hall 2A ready for service forecast 14 days later");
    // The body keeps the whole name.
    expect(moved.groups[0]!.moves[0]!.title).toBe("Hall 2A ready for service (48 racks, 480 kW)");
  });

  it("never tells a public update of an internal milestone: not its name, its id, nor its area's photos", () => {
    const hidden = milestone({ milestoneId: 77, name: "Contractor compound handover", audience: "internal", area: "Compound", kind: "completed", days: null, to: "2026-11-12" });
    const s = suggestDraft({ ...nothing, milestones: [milestone(), hidden], photos: [photo({ mediaId: 5, tags: { areas: ["Compound"], systems: [], milestones: [77] } })] })!;
    const json = JSON.stringify(s);
    expect(json).not.toContain("Contractor compound");
    expect(json).not.toContain("Compound");
    expect(s.milestoneIds).toEqual([11]);
    expect(s.photos).toEqual([]);
    // The same milestone is news to an internal update.
    expect(suggestDraft({ ...nothing, audience: "internal", milestones: [hidden] })!.milestoneIds).toEqual([77]);
  });

  it("tells the record only to investor (investor items) and internal updates", () => {
    const record = [
      { kind: "risk" as const, audience: "investor" as const, title: "R-004 Chiller delivery", detail: "new", at: "2026-11-20" },
      { kind: "decision" as const, audience: "internal" as const, title: "D-009 Crane hire", detail: "decision needed by 2026-12-10", at: "2026-11-20" },
    ];
    expect(suggestDraft({ ...nothing, record })).toBeNull();
    expect(suggestDraft({ ...nothing, audience: "investor", record })!.groups.flatMap((g) => g.moves.map((m) => m.title))).toEqual(["R-004 Chiller delivery"]);
    expect(suggestDraft({ ...nothing, audience: "internal", record })!.groups.map((g) => g.heading)).toEqual(["Risks and issues", "Decisions"]);
  });

  it("offers cleared photos of the window tagged with what moved, more matches first, then newer", () => {
    const s = suggestDraft({
      ...nothing,
      milestones: [milestone()],
      photos: [
        photo({ mediaId: 1, takenAt: "2026-11-05T10:00:00" }),
        photo({ mediaId: 2, takenAt: "2026-11-20T10:00:00" }),
        photo({ mediaId: 3, takenAt: "2026-11-02T10:00:00", tags: { areas: ["Hall 2A"], systems: ["power"], milestones: [11] } }),
        photo({ mediaId: 4, cleared: false }),
        photo({ mediaId: 5, takenAt: "2026-10-20T10:00:00" }),
        photo({ mediaId: 6, tags: { areas: ["Hall 3"], systems: [], milestones: [] } }),
        photo({ mediaId: 7, takenAt: null }),
      ],
    })!;
    expect(s.photos.map((p) => p.mediaId)).toEqual([3, 2, 1]);
    expect(s.photos[0]!.because).toEqual(["HD-1 energised", "Hall 2A", "power"]);
    expect(s.photos[0]!.altCandidate).toBe("Chillers lifted onto the roof of Hall 2A");
  });

  it("offers at most a few photos", () => {
    const photos = Array.from({ length: 20 }, (_, i) => photo({ mediaId: i + 1 }));
    expect(suggestDraft({ ...nothing, milestones: [milestone()], photos })!.photos).toHaveLength(MAX_SUGGESTED_PHOTOS);
  });

  it("property: no hidden milestone's name or id ever reaches a public or investor suggestion", () => {
    const audience = fc.constantFrom("public" as const, "investor" as const, "internal" as const);
    const event = fc.record({
      milestoneId: fc.integer({ min: 1, max: 40 }),
      audience,
      kind: fc.constantFrom("completed" as const, "later" as const, "earlier" as const),
      days: fc.integer({ min: -60, max: 60 }),
      area: fc.constantFrom("Hall 2A", "Hall 2B", null),
    });
    fc.assert(
      fc.property(fc.array(event, { maxLength: 12 }), fc.constantFrom("public" as const, "investor" as const), fc.array(fc.array(fc.integer({ min: 1, max: 40 }), { maxLength: 4 }), { maxLength: 6 }), (events, forAudience, photoTags) => {
        // Each milestone has one audience: the first event's.
        const audienceOf = new Map<number, string>();
        for (const e of events) if (!audienceOf.has(e.milestoneId)) audienceOf.set(e.milestoneId, e.audience);
        const milestones = events.map((e) => milestone({ ...e, audience: audienceOf.get(e.milestoneId) as MilestoneMoveEvent["audience"], name: `M-${e.milestoneId}-${audienceOf.get(e.milestoneId)}-name`, days: e.kind === "completed" ? null : e.days }));
        const photos = photoTags.map((ids, i) => photo({ mediaId: 100 + i, tags: { areas: [], systems: [], milestones: ids } }));
        const s = suggestDraft({ ...nothing, audience: forAudience, milestones, photos });
        const hidden = [...audienceOf].filter(([, a]) => a === "internal" || (forAudience === "public" && a === "investor")).map(([id]) => id);
        if (!s) return;
        const json = JSON.stringify(s);
        for (const id of hidden) {
          expect(json).not.toContain(`M-${id}-`);
          expect(s.milestoneIds).not.toContain(id);
          expect(s.groups.flatMap((g) => g.moves.map((m) => m.milestoneId))).not.toContain(id);
        }
      }),
      { numRuns: 300 },
    );
  });
});
