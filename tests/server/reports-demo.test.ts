import { DateTime } from "luxon";
import { describe, expect, it } from "vitest";
import type { ReportDetail, ReportListItem } from "../../src/shared/schemas/reports.ts";
import type { ReportFigures } from "../../src/shared/domain/report-figures.ts";
import { DEMO } from "../helpers/app.ts";
import { binary, pageTexts } from "./documents-fixtures.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
const SLUG = "aldermere-phase-2";

describe("the demo's monthly reports", () => {
  it("the investor room holds the last two months' reports, issued, with the lead's commentary and figures as at each month end", async () => {
    const today = DateTime.now().setZone("Europe/London");
    const expected = [today.minus({ months: 1 }).toFormat("yyyy-LL"), today.minus({ months: 2 }).toFormat("yyyy-LL")];
    const list = (await f.as.investor.agent.get(`/api/projects/${SLUG}/reports`).expect(200)).body as ReportListItem[];
    expect(list.map((r) => [r.month, r.state])).toEqual(expected.map((m) => [m, "issued"]));
    for (const item of list) {
      expect(item.issuedAt).not.toBeNull();
      const r = (await f.as.investor.agent.get(`/api/reports/${item.id}`).expect(200)).body as ReportDetail;
      const figures = r.figures as unknown as ReportFigures;
      expect(figures.month).toBe(item.month);
      expect(figures.state).toBe("issued");
      expect(figures.summary.blocks.length).toBeGreaterThan(0);
      expect(figures.milestones.length).toBeGreaterThan(0);
      expect(r.commentaryHtml.summary).toMatch(/<p>.+<\/p>/);
    }
  });

  it("each issued report's PDF reaches the investor stamped with their address on every page", async () => {
    const list = (await f.as.investor.agent.get(`/api/projects/${SLUG}/reports`).expect(200)).body as ReportListItem[];
    const res = await f.as.investor.agent.get(`/api/reports/${list[0]!.id}/pdf`).buffer(true).parse(binary).expect(200);
    const pages = await pageTexts(res.body as Buffer);
    expect(pages.length).toBeGreaterThan(1);
    for (const text of pages) expect(text).toContain(DEMO.investor);
  });
});
