import { zodResolver } from "@hookform/resolvers/zod";
import { fireEvent, render, screen, waitFor, within } from "@testing-library/react";
import { useForm } from "react-hook-form";
import { describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { CalendarDateSchema } from "../../src/shared/schemas/common.ts";
import { DateField } from "../../src/components/ui/date-field.tsx";

const Schema = z.object({ due: CalendarDateSchema });

/** A form as the office's are written: the shared schema, `register`, and the field. */
function DueForm({ onSave, initial }: { onSave: (v: { due: string }) => void; initial?: string }) {
  const form = useForm<{ due: string }>({ resolver: zodResolver(Schema), defaultValues: initial ? { due: initial } : undefined });
  return (
    <form onSubmit={form.handleSubmit(onSave)}>
      <DateField label="Due" error={form.formState.errors.due?.message} {...form.register("due")} />
      <button type="submit">Save</button>
      <button type="button" onClick={() => form.reset({ due: "2027-03-01" })}>
        Reset
      </button>
      <button type="button" onClick={() => form.setValue("due", "2027-02-08")}>
        A week later
      </button>
    </form>
  );
}

describe("the date field", () => {
  it("shows the stored day in the project's format and a dd/mm/yyyy placeholder, never a native date box", () => {
    render(<DueForm onSave={() => undefined} initial="2027-01-15" />);
    const box = screen.getByLabelText("Due") as HTMLInputElement;
    expect(box.type).toBe("text");
    expect(box.value).toBe("15/01/2027");
    expect(box.placeholder).toBe("dd/mm/yyyy");
  });

  it.each([
    ["15/01/2027", "2027-01-15"],
    ["15 Jan 2027", "2027-01-15"],
    ["15 January 2027", "2027-01-15"],
    ["2027-01-15", "2027-01-15"],
  ])("sends %j to the form as %s", async (typed, iso) => {
    const onSave = vi.fn();
    render(<DueForm onSave={onSave} />);
    fireEvent.change(screen.getByLabelText("Due"), { target: { value: typed } });
    fireEvent.blur(screen.getByLabelText("Due"));
    expect((screen.getByLabelText("Due") as HTMLInputElement).value).toBe("15/01/2027");
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await waitFor(() => expect(onSave).toHaveBeenCalledTimes(1));
    expect(onSave.mock.calls[0]![0]).toEqual({ due: iso });
  });

  it("shows a value set by the form (as the site walk's week buttons do)", async () => {
    render(<DueForm onSave={() => undefined} initial="2027-02-01" />);
    fireEvent.click(screen.getByRole("button", { name: "A week later" }));
    await waitFor(() => expect((screen.getByLabelText("Due") as HTMLInputElement).value).toBe("08/02/2027"));
  });

  it("shows a reset value in the box, and saves it", async () => {
    const onSave = vi.fn();
    render(<DueForm onSave={onSave} initial="2027-01-15" />);
    fireEvent.click(screen.getByRole("button", { name: "Reset" }));
    await waitFor(() => expect((screen.getByLabelText("Due") as HTMLInputElement).value).toBe("01/03/2027"));
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await waitFor(() => expect(onSave).toHaveBeenCalledTimes(1));
    expect(onSave.mock.calls[0]![0]).toEqual({ due: "2027-03-01" });
  });

  it("says what to type when the text is not a date, and the form does not save", async () => {
    const onSave = vi.fn();
    render(<DueForm onSave={onSave} initial="2027-01-15" />);
    const box = screen.getByLabelText("Due");
    fireEvent.change(box, { target: { value: "01/15/2027" } });
    fireEvent.blur(box);
    expect(screen.getByRole("alert").textContent).toContain("Enter a date, for example 15 January 2027");
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await waitFor(() => expect(box.getAttribute("aria-invalid")).toBe("true"));
    expect(onSave).not.toHaveBeenCalled();
    // The older date is not kept silently: the box still shows what was typed.
    expect((box as HTMLInputElement).value).toBe("01/15/2027");
  });

  it("picks a day from the calendar with the keyboard and sends ISO", async () => {
    const onSave = vi.fn();
    render(<DueForm onSave={onSave} initial="2027-01-15" />);
    fireEvent.click(screen.getByRole("button", { name: "Open calendar" }));
    const dialog = screen.getByRole("dialog");
    expect(dialog.textContent).toContain("January 2027");
    expect(within(dialog).getByTestId("calendar-shows").textContent).toBe("15/01/2027");
    // Weeks start on Monday, as in en-GB.
    expect(within(dialog).getAllByRole("columnheader")[0]!.textContent).toBe("Mon");
    const focused = document.activeElement as HTMLElement;
    expect(focused.getAttribute("aria-label")).toBe("15 January 2027");
    fireEvent.keyDown(focused, { key: "ArrowRight" });
    fireEvent.keyDown(document.activeElement!, { key: "ArrowDown" });
    expect(document.activeElement!.getAttribute("aria-label")).toBe("23 January 2027");
    fireEvent.keyDown(document.activeElement!, { key: "PageDown" });
    expect(document.activeElement!.getAttribute("aria-label")).toBe("23 February 2027");
    expect(dialog.textContent).toContain("February 2027");
    fireEvent.click(document.activeElement!);
    expect(screen.queryByRole("dialog")).toBeNull();
    expect((screen.getByLabelText("Due") as HTMLInputElement).value).toBe("23/02/2027");
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await waitFor(() => expect(onSave).toHaveBeenCalledTimes(1));
    expect(onSave.mock.calls[0]![0]).toEqual({ due: "2027-02-23" });
  });

  it("closes the calendar on Escape and offers no day outside the allowed range", () => {
    const onChange = vi.fn();
    render(<DateField label="Needed by" value="2027-01-15" min="2027-01-10" onChange={onChange} />);
    fireEvent.click(screen.getByRole("button", { name: "Open calendar" }));
    expect((screen.getByRole("button", { name: "9 January 2027" }) as HTMLButtonElement).disabled).toBe(true);
    expect((screen.getByRole("button", { name: "10 January 2027" }) as HTMLButtonElement).disabled).toBe(false);
    fireEvent.keyDown(document.activeElement!, { key: "Escape" });
    expect(screen.queryByRole("dialog")).toBeNull();
    expect(onChange).not.toHaveBeenCalled();
    const box = screen.getByLabelText("Needed by");
    fireEvent.change(box, { target: { value: "1/1/2027" } });
    fireEvent.blur(box);
    expect(onChange).toHaveBeenLastCalledWith({ target: { name: "", value: "2027-01-01", type: "text" }, type: "change" });
    expect(screen.getByRole("alert").textContent).toContain("Enter a date on or after 10 January 2027");
  });
});
