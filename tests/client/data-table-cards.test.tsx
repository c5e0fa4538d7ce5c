import { fireEvent, screen, within } from "@testing-library/react";
import { createColumnHelper, getCoreRowModel, getExpandedRowModel, getGroupedRowModel, useReactTable } from "@tanstack/react-table";
import { afterEach, describe, expect, it, vi } from "vitest";
import type { SubscriberRow } from "../../src/shared/schemas/subscribers.ts";
import { DataTable } from "../../src/components/ui/data-table.tsx";
import { SubscribersTable } from "../../src/features/subscribers/components/subscribers-table.tsx";
import { STATUS_LOOK } from "../../src/features/subscribers/words.ts";
import { renderWithApp } from "./render.tsx";

/** A window of the given width for `matchMedia` (jsdom has none). */
function stubWidth(px: number) {
  vi.stubGlobal("matchMedia", (query: string) => {
    const max = /max-width:\s*([\d.]+)px/.exec(query);
    return { matches: max ? px <= Number(max[1]) : false, media: query, addEventListener: () => undefined, removeEventListener: () => undefined };
  });
}
afterEach(() => vi.unstubAllGlobals());

// Invented subscribers of the demo scenario (Aldermere Campus Phase 2).
const project = { slug: "aldermere-phase-2", name: "Aldermere Campus Phase 2" };
const subscriber = (id: number, name: string, email: string): SubscriberRow => ({
  id,
  project,
  email,
  name,
  organisation: id === 1 ? "Harrowgate Analytics" : null,
  interest: "prospect",
  audience: "public",
  frequency: "weekly",
  topics: null,
  status: "confirmed",
  account: false,
  consentAt: "2026-10-01T09:00:00.000Z",
  consentSource: "subscribe form",
  consentVersion: "1",
  confirmedAt: "2026-10-01T09:05:00.000Z",
  lastDigestAt: null,
  createdAt: "2026-10-01T09:00:00.000Z",
});
const rows = [subscriber(1, "Ada Fenwick", "ada@example.org"), subscriber(2, "Tom Brindle", "tom@example.org")];

describe("the shared table's card mode", () => {
  it("below 640 px draws each subscriber as a card: the key fact first, the rest labelled, its actions inside", () => {
    stubWidth(375);
    renderWithApp(<SubscribersTable rows={rows} />);
    expect(screen.queryByRole("table")).toBeNull();
    const list = screen.getByRole("list", { name: "Subscribers" });
    const cards = within(list).getAllByRole("listitem");
    expect(cards).toHaveLength(2);
    const first = cards[0]!;
    // The first column heads the card (no column marked key): name, address and organisation.
    expect(first.firstElementChild?.textContent).toBe("Ada Fenwickada@example.orgHarrowgate Analytics");
    // Every other column with a heading appears as its label beside its value.
    const labels = within(first).getAllByRole("term").map((t) => t.textContent);
    expect(labels).toEqual(["Interest", "Status", "How often", "Topics", "Consent"]);
    const values = within(first).getAllByRole("definition").map((d) => d.textContent);
    expect(values[1]).toContain(STATUS_LOOK.confirmed.word);
    expect(values[1]).toContain(STATUS_LOOK.confirmed.glyph);
    // The row's actions are in its card, named for that row.
    expect(within(first).getByRole("button", { name: "Erase ada@example.org" })).toBeTruthy();
    expect(within(first).getByRole("link", { name: "Data of ada@example.org as JSON" })).toBeTruthy();
    expect(within(cards[1]!).getByRole("button", { name: "Erase tom@example.org" })).toBeTruthy();
  });

  it("below 640 px offers the table's sorting as one menu above the cards", () => {
    stubWidth(375);
    renderWithApp(<SubscribersTable rows={rows} />);
    const names = () => screen.getAllByTestId("row-card").map((c) => within(c).getByText(/^(Ada|Tom) /).textContent);
    expect(names()).toEqual(["Ada Fenwick", "Tom Brindle"]);
    fireEvent.change(screen.getByLabelText("Sort subscribers by"), { target: { value: "desc:name" } });
    expect(names()).toEqual(["Tom Brindle", "Ada Fenwick"]);
    fireEvent.change(screen.getByLabelText("Sort subscribers by"), { target: { value: "" } });
    expect(names()).toEqual(["Ada Fenwick", "Tom Brindle"]);
  });

  it("at 1280 px keeps the table, its actions column held at the right edge", () => {
    stubWidth(1280);
    renderWithApp(<SubscribersTable rows={rows} />);
    const table = screen.getByRole("table", { name: "Subscribers" });
    expect(screen.queryByRole("list", { name: "Subscribers" })).toBeNull();
    const erase = within(table).getByRole("button", { name: "Erase ada@example.org" });
    expect(erase.closest("td")?.className).toContain("sticky");
    expect(within(table).getAllByRole("columnheader").map((h) => h.textContent)).toEqual(["Subscriber↕", "Interest↕", "Status↕", "How often↕", "Topics↕", "Consent↕", ""]);
  });

  it("puts the columns marked key at the head of the card, in column order, and says when there are no rows", () => {
    type Row = { ref: string; title: string; owner: string };
    const col = createColumnHelper<Row>();
    const columns = [
      col.accessor("owner", { header: "Owner" }),
      col.accessor("ref", { header: "Ref", meta: { key: true } }),
      col.accessor("title", { header: "Change", meta: { key: true } }),
      col.display({ id: "edit", header: "Change it", meta: { actions: true }, cell: (c) => <button type="button">Edit {c.row.original.ref}</button> }),
    ];
    function Harness({ data }: { data: Row[] }) {
      const table = useReactTable({ data, columns, getCoreRowModel: getCoreRowModel() });
      return <DataTable table={table} caption="Budget changes" empty="No budget change recorded yet." rowProps={(r) => ({ "data-change-id": r.original.ref, className: "ignored-on-a-card" })} />;
    }
    stubWidth(375);
    const { unmount } = renderWithApp(<Harness data={[{ ref: "C-004", title: "Second chiller pad", owner: "Mara Quill" }]} />);
    const card = screen.getByRole("listitem");
    expect(card.getAttribute("data-change-id")).toBe("C-004");
    expect(card.className).not.toContain("ignored-on-a-card");
    expect(card.firstElementChild?.textContent).toBe("C-004Second chiller pad");
    expect(within(card).getAllByRole("term").map((t) => t.textContent)).toEqual(["Owner"]);
    // The actions column is not listed as a fact: its button closes the card.
    expect(card.lastElementChild?.textContent).toBe("Edit C-004");
    unmount();
    renderWithApp(<Harness data={[]} />);
    expect(screen.getByText("No budget change recorded yet.")).toBeTruthy();
    expect(screen.queryByRole("list")).toBeNull();
  });

  it("heads each group of a grouped table with the group's name and size", () => {
    type Row = { phase: string; name: string };
    const col = createColumnHelper<Row>();
    const columns = [col.accessor("phase", { header: "Phase" }), col.accessor("name", { header: "Milestone", meta: { key: true } })];
    function Harness() {
      const table = useReactTable({
        data: [
          { phase: "Shell", name: "Roof watertight" },
          { phase: "Fit-out", name: "Hall 2A containment" },
          { phase: "Fit-out", name: "HD-1 busbar" },
        ],
        columns,
        state: { grouping: ["phase"], expanded: true, columnVisibility: { phase: false } },
        getCoreRowModel: getCoreRowModel(),
        getGroupedRowModel: getGroupedRowModel(),
        getExpandedRowModel: getExpandedRowModel(),
      });
      return <DataTable table={table} caption="Milestones" />;
    }
    stubWidth(375);
    renderWithApp(<Harness />);
    expect(screen.getAllByRole("heading", { level: 3 }).map((h) => h.textContent)).toEqual(["Shell (1)", "Fit-out (2)"]);
    expect(screen.getAllByTestId("row-card").map((c) => c.firstElementChild?.textContent)).toEqual(["Roof watertight", "Hall 2A containment", "HD-1 busbar"]);
  });
});
