import { describe, expect, it } from "vitest";
import { findThenAndNowPairs, pairScore, type PairablePhoto } from "../../src/shared/domain/then-and-now.ts";

// Our own invented examples on the Aldermere Campus Phase 2 scenario (no published source: which
// photos make a then-and-now pair is a product rule, decision 063).
const A = "0f0f0f0f0f0f0f0f";
const A2 = "0f0f0f0f0f0f0f0e"; // 1 bit from A
const A5 = "0f0f0f0f0f0f0ff0"; // 8 bits from A
const FAR = "f0f0f0f0f0f0f0f0"; // 64 bits from A

const photo = (id: number, takenAt: string | null, fingerprint: string | null, over: Partial<PairablePhoto> = {}): PairablePhoto => ({ id, areas: ["Hall 2A"], takenAt, fingerprint, cleared: true, ...over });
const opts = { minDays: 30, maxDistance: 12 };
const ids = (pairs: ReturnType<typeof findThenAndNowPairs>) => pairs.map((p) => [p.thenId, p.nowId]);

describe("findThenAndNowPairs", () => {
  it("pairs two photos of one area, far enough apart and alike, earlier one first, with days and distance", () => {
    const pairs = findThenAndNowPairs([photo(2, "2026-09-14T10:00:00", A2), photo(1, "2026-05-02T09:13:00+01:00", A)], opts);
    expect(pairs).toEqual([{ area: "Hall 2A", thenId: 1, nowId: 2, daysApart: 135, distance: 1, score: pairScore(135, 1, 12) }]);
  });

  it("pairs only within one area tag", () => {
    const pairs = findThenAndNowPairs([photo(1, "2026-05-02", A, { areas: ["Plant yard"] }), photo(2, "2026-09-14", A, { areas: ["Hall 2A"] })], opts);
    expect(pairs).toEqual([]);
    const shared = findThenAndNowPairs([photo(1, "2026-05-02", A, { areas: ["Plant yard", "Hall 2A"] }), photo(2, "2026-09-14", A, { areas: ["Hall 2A"] })], opts);
    expect(shared.map((p) => p.area)).toEqual(["Hall 2A"]);
  });

  it("needs at least minDays calendar days between the captures", () => {
    expect(findThenAndNowPairs([photo(1, "2026-05-02T23:00:00", A), photo(2, "2026-05-31T01:00:00", A)], opts)).toEqual([]);
    expect(ids(findThenAndNowPairs([photo(1, "2026-05-02T23:00:00", A), photo(2, "2026-06-01T01:00:00", A)], opts))).toEqual([[1, 2]]);
    expect(ids(findThenAndNowPairs([photo(1, "2026-05-02", A), photo(2, "2026-05-12", A)], { ...opts, minDays: 10 }))).toEqual([[1, 2]]);
  });

  it("needs the framing alike: a distance at most the threshold", () => {
    expect(findThenAndNowPairs([photo(1, "2026-05-02", A), photo(2, "2026-09-14", FAR)], opts)).toEqual([]);
    expect(ids(findThenAndNowPairs([photo(1, "2026-05-02", A), photo(2, "2026-09-14", A5)], { ...opts, maxDistance: 8 }))).toEqual([[1, 2]]);
    expect(findThenAndNowPairs([photo(1, "2026-05-02", A), photo(2, "2026-09-14", A5)], { ...opts, maxDistance: 7 })).toEqual([]);
  });

  it("offers only photos cleared for the audience, with a capture date and a fingerprint", () => {
    const base = [photo(1, "2026-05-02", A), photo(2, "2026-09-14", A)];
    expect(findThenAndNowPairs([base[0]!, { ...base[1]!, cleared: false }], opts)).toEqual([]);
    expect(findThenAndNowPairs([base[0]!, { ...base[1]!, takenAt: null }], opts)).toEqual([]);
    expect(findThenAndNowPairs([base[0]!, { ...base[1]!, fingerprint: null }], opts)).toEqual([]);
    expect(findThenAndNowPairs([base[0]!, { ...base[1]!, takenAt: "taken one day" }], opts)).toEqual([]);
  });

  it("ranks by time apart and likeness together: the formula, then longer apart, then closer", () => {
    // Source: our ranking (decision 063): min(days, 730) / 730 + (1 − distance / 13).
    expect(pairScore(365, 0, 12)).toBeCloseTo(1.5, 10);
    expect(pairScore(1000, 13, 12)).toBeCloseTo(1, 10);
    const pairs = findThenAndNowPairs(
      [
        photo(1, "2026-01-05", A, { areas: ["Plant yard"] }),
        photo(2, "2026-12-20", A5, { areas: ["Plant yard"] }), // 349 days, 8 bits: 0.478 + 0.385 = 0.863
        photo(3, "2026-03-01", A, { areas: ["HD-1"] }),
        photo(4, "2026-06-01", A, { areas: ["HD-1"] }), // 92 days, 0 bits: 0.126 + 1 = 1.126
        photo(5, "2026-01-01", A, { areas: ["Site"] }),
        photo(6, "2026-04-02", A, { areas: ["Site"] }), // 91 days, 0 bits: 1.125
      ],
      opts,
    );
    expect(ids(pairs)).toEqual([[3, 4], [5, 6], [1, 2]]);
  });

  it("uses each photo in at most one pair of an area, the best first", () => {
    const pairs = findThenAndNowPairs([photo(1, "2026-01-05", A), photo(2, "2026-06-01", A), photo(3, "2026-11-01", A), photo(4, "2026-11-02", A2)], opts);
    // 1–3 is the best (300 days, identical); 2 then takes 4 (154 days), not 3 or 1, which are used.
    expect(ids(pairs)).toEqual([[1, 3], [2, 4]]);
  });

  it("narrows to one area and to a limit", () => {
    const photos = [photo(1, "2026-01-05", A), photo(2, "2026-06-01", A), photo(3, "2026-01-05", A, { areas: ["HD-1"] }), photo(4, "2026-09-01", A, { areas: ["HD-1"] })];
    expect(findThenAndNowPairs(photos, { ...opts, area: "HD-1" }).map((p) => p.area)).toEqual(["HD-1"]);
    expect(findThenAndNowPairs(photos, { ...opts, limit: 1 })).toHaveLength(1);
  });

  it("finds nothing in an empty library", () => {
    expect(findThenAndNowPairs([], opts)).toEqual([]);
  });
});
