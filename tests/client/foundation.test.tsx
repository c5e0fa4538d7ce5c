import { fireEvent, screen, waitFor } from "@testing-library/react";
import { getCoreRowModel, useReactTable, type ColumnDef } from "@tanstack/react-table";
import { describe, expect, it } from "vitest";
import { DataTable } from "../../src/components/ui/data-table.tsx";
import { TextField } from "../../src/components/ui/field.tsx";
import { RequireRole } from "../../src/features/auth/components/require-role.tsx";
import { SignInPage } from "../../src/features/auth/routes.tsx";
import { formatDate, formatInstant } from "../../src/lib/format.ts";
import { sessionKeys } from "../../src/lib/session.ts";
import { renderWithApp } from "./render.tsx";

describe("SignInPage", () => {
  it("shows field messages from the shared schema without asking the server", async () => {
    renderWithApp(<SignInPage />);
    fireEvent.change(screen.getByLabelText("E-mail address"), { target: { value: "not-an-address" } });
    fireEvent.click(screen.getByRole("button", { name: "Sign in" }));
    await waitFor(() => expect(screen.getByText(/not a valid e-mail address/)).toBeTruthy());
    expect(screen.getByText(/is required/)).toBeTruthy();
    expect(screen.getByLabelText("E-mail address").getAttribute("aria-invalid")).toBe("true");
  });
});

describe("RequireRole", () => {
  it("sends a signed-out visitor to sign-in", async () => {
    renderWithApp(
      <RequireRole roles={["admin"]} area="site office">
        <p>secret</p>
      </RequireRole>,
      { data: [[sessionKeys.me(), null]] },
    );
    await waitFor(() => expect(screen.getByText("sign-in page")).toBeTruthy());
    expect(screen.queryByText("secret")).toBeNull();
  });

  it("shows a refusal to a signed-in user of the wrong role, and the content to the right one", () => {
    const investor = { id: 4, email: "i@x.example", name: "I", role: "investor" as const };
    const { unmount } = renderWithApp(
      <RequireRole roles={["admin", "lead", "marketing"]} area="site office">
        <p>secret</p>
      </RequireRole>,
      { data: [[sessionKeys.me(), investor]] },
    );
    expect(screen.getByRole("heading", { name: "Not open to your account" })).toBeTruthy();
    expect(screen.queryByText("secret")).toBeNull();
    unmount();
    renderWithApp(
      <RequireRole roles={["admin"]} area="site office">
        <p>secret</p>
      </RequireRole>,
      { data: [[sessionKeys.me(), { ...investor, role: "admin" }]] },
    );
    expect(screen.getByText("secret")).toBeTruthy();
  });
});

describe("TextField", () => {
  it("ties its label, hint and error to the input", () => {
    renderWithApp(<TextField label="Site" hint="Where it is" error="is required" />);
    const input = screen.getByLabelText("Site");
    expect(input.getAttribute("aria-describedby")).toMatch(/-error$/);
    expect(screen.getByRole("alert").textContent).toMatch(/is required/);
  });
});

function People({ rows }: { rows: Array<{ name: string }> }) {
  const columns: ColumnDef<{ name: string }>[] = [{ accessorKey: "name", header: "Name" }];
  const table = useReactTable({ data: rows, columns, getCoreRowModel: getCoreRowModel() });
  return <DataTable table={table} caption="People" empty="Nobody yet." />;
}

describe("DataTable", () => {
  it("renders rows, and the empty message when there are none", () => {
    const { unmount } = renderWithApp(<People rows={[{ name: "Ada" }, { name: "Bo" }]} />);
    expect(screen.getAllByRole("row")).toHaveLength(3);
    unmount();
    renderWithApp(<People rows={[]} />);
    expect(screen.getByText("Nobody yet.")).toBeTruthy();
  });
});

describe("formatting", () => {
  it("never shifts a calendar date, whatever the machine's zone", () => {
    // The test runs with TZ set to a zone west of UTC (scripts/test.sh).
    expect(formatDate("2027-03-01")).toBe("1 Mar 2027");
    expect(formatDate(null)).toBe("—");
  });
  it("shows instants in the project's zone with the zone named", () => {
    // Europe/London is on GMT in January and BST in July (common knowledge of the zone's rules).
    expect(formatInstant("2027-01-15T12:00:00Z", "Europe/London")).toMatch(/12:00 GMT/);
    expect(formatInstant("2027-07-15T12:00:00Z", "Europe/London")).toMatch(/13:00 BST/);
  });
});
