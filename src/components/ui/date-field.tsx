import { CalendarDays, ChevronLeft, ChevronRight } from "lucide-react";
import { forwardRef, useEffect, type ForwardedRef, useId, useRef, useState, type KeyboardEvent, type ReactNode } from "react";
import { addDays, daysInMonth, isCalendarDate, type CalendarDate } from "#shared/domain/calendar.ts";
import { DATE_ERROR, formatLongDate, formatMonthYear, formatShortDate, formatTypedDate, parseTypedDate, PROJECT_LOCALE, typedDatePattern } from "#shared/domain/locale-dates.ts";
import { todayIn } from "../../lib/format.ts";
import { FieldError } from "./field.tsx";

/**
 * The one date field of every form (decision 057): a text box that shows and accepts the
 * project's format ("15/01/2027", also "15 Jan 2027", "15 January 2027" or ISO), with a calendar
 * beside it that shows the same format. The form only ever receives ISO `YYYY-MM-DD` (or "" when
 * empty); text it cannot read is passed on as typed, so the shared schema refuses it with the
 * same sentence the server would give rather than the form keeping an older date unseen.
 *
 * It takes `{...form.register(name)}` as a native input does: the handle given to `ref` reads and
 * sets the ISO value, so `reset` and `setValue` show in the box.
 */

/** What a change looks like to the form: the shape of an input's change event, value in ISO. */
export interface DateFieldEvent {
  target: { name: string; value: string; type: "text" };
  type: "change" | "blur";
}

export interface DateFieldProps {
  /** The visible label; with `labelHidden` it names the box for assistive technology only (table cells). */
  label: string;
  labelHidden?: boolean;
  name?: string;
  id?: string;
  /** ISO `YYYY-MM-DD` or "" (controlled use); omit with `register`. */
  value?: string | null;
  onChange?: (e: DateFieldEvent) => void;
  onBlur?: (e: DateFieldEvent) => void;
  /** Earliest and latest day offered, ISO (a number from `register` is ignored: dates are text). */
  min?: string | number;
  max?: string | number;
  /** What `register` may pass along; a date's length and pattern are the parser's business. */
  minLength?: number;
  maxLength?: number;
  pattern?: string;
  disabled?: boolean;
  required?: boolean;
  error?: string;
  hint?: ReactNode;
  /** Classes of the text box (size, width). */
  className?: string;
}

/** What `register`'s ref receives: the field's value as ISO, and focus for the first error. */
export interface DateFieldHandle {
  name: string;
  type: "text";
  value: string;
  focus: () => void;
}

const WEEKDAYS = [1, 2, 3, 4, 5, 6, 7].map((i) => {
  // 2027-03-01 is a Monday: weeks start on Monday in en-GB.
  const at = new Date(Date.UTC(2027, 2, i));
  return { short: new Intl.DateTimeFormat(PROJECT_LOCALE, { weekday: "short", timeZone: "UTC" }).format(at), long: new Intl.DateTimeFormat(PROJECT_LOCALE, { weekday: "long", timeZone: "UTC" }).format(at) };
});

/** Today in the browser's own zone: the picker opens on the month the person is living in. */
const todayLocal = (): CalendarDate => todayIn();

function outOfRange(date: CalendarDate, min?: string, max?: string): boolean {
  return (!!min && isCalendarDate(min) && date < min) || (!!max && isCalendarDate(max) && date > max);
}

/** The sentence for a date that was read but lies outside `min`–`max`. */
function rangeError(date: CalendarDate, min?: string, max?: string): string | undefined {
  if (min && isCalendarDate(min) && date < min) return `Enter a date on or after ${formatLongDate(min)}`;
  if (max && isCalendarDate(max) && date > max) return `Enter a date on or before ${formatLongDate(max)}`;
  return undefined;
}

function giveHandle(r: ForwardedRef<DateFieldHandle>, h: DateFieldHandle | null): void {
  if (typeof r === "function") r(h);
  else if (r) r.current = h;
}

export const DateField = forwardRef<DateFieldHandle, DateFieldProps>(function DateField(
  { label, labelHidden = false, name = "", id, value, onChange, onBlur, min: minGiven, max: maxGiven, disabled, required, error, hint, className = "" },
  ref,
) {
  const min = typeof minGiven === "string" ? minGiven : undefined;
  const max = typeof maxGiven === "string" ? maxGiven : undefined;
  const auto = useId();
  const fid = id ?? auto;
  const inputRef = useRef<HTMLInputElement>(null);
  const [iso, setIso] = useState<string>(value ?? "");
  const [text, setText] = useState<string>(value && isCalendarDate(value) ? formatTypedDate(value) : (value ?? ""));
  const [ownError, setOwnError] = useState<string>();
  const [open, setOpen] = useState(false);
  const isoRef = useRef(iso);
  isoRef.current = iso;

  /** A value from outside (the form's reset, setValue, a controlled parent): shown in the box. */
  const show = (next: string) => {
    if (next === isoRef.current) return;
    isoRef.current = next;
    setIso(next);
    setText(isCalendarDate(next) ? formatTypedDate(next) : next);
    setOwnError(undefined);
  };

  useEffect(() => {
    if (value !== undefined) show(value ?? "");
  }, [value]);

  // One handle object for the field's life. `register` hands over a new ref callback on every
  // render; given the same handle again the form sees nothing new, where a new object each time
  // would make it set the value, render and hand over another ref, without end.
  const showRef = useRef(show);
  showRef.current = show;
  const handle = useRef<DateFieldHandle>({
    name,
    // A type, as an input has: the form reads and sets the value through it quietly.
    type: "text",
    get value() {
      return isoRef.current;
    },
    set value(next: string) {
      showRef.current(next ?? "");
    },
    focus: () => inputRef.current?.focus(),
  });
  // The same handle on every new ref callback: `register` ignores a handle it already holds, and
  // after `reset` (which forgets its fields) takes it again and sets the reset value through it.
  // Let go only when the field leaves the page: letting go on each new callback would unregister
  // and re-register the field on every render, without end.
  const latestRef = useRef(ref);
  latestRef.current = ref;
  useEffect(() => {
    giveHandle(ref, handle.current);
  }, [ref]);
  useEffect(() => () => giveHandle(latestRef.current, null), []);

  const emit = (next: string, type: "change" | "blur" = "change") => {
    isoRef.current = next;
    setIso(next);
    (type === "change" ? onChange : onBlur)?.({ target: { name, value: next, type: "text" }, type });
  };

  const typed = (t: string) => {
    setText(t);
    const read = parseTypedDate(t);
    emit(t.trim() === "" ? "" : (read ?? t.trim()));
    if (read || t.trim() === "") setOwnError(undefined);
  };

  const settle = () => {
    const read = parseTypedDate(text);
    if (read) {
      setText(formatTypedDate(read));
      setOwnError(rangeError(read, min, max));
    } else setOwnError(text.trim() === "" ? undefined : DATE_ERROR);
    onBlur?.({ target: { name, value: isoRef.current, type: "text" }, type: "blur" });
  };

  const pick = (date: CalendarDate) => {
    setText(formatTypedDate(date));
    setOwnError(undefined);
    emit(date);
    setOpen(false);
    inputRef.current?.focus();
  };

  const shown = error ?? ownError;
  const hintId = `${fid}-hint`;
  const errorId = `${fid}-error`;
  const hintText = hint ?? `For example ${formatTypedDate("2027-01-15")}`;

  return (
    <div className="relative flex flex-col gap-1">
      <label htmlFor={fid} className={labelHidden ? "sr-only" : "text-sm font-medium text-ink"}>
        {label}
      </label>
      <div className="flex items-stretch gap-1">
        <input
          ref={inputRef}
          id={fid}
          name={name || undefined}
          type="text"
          inputMode="text"
          autoComplete="off"
          placeholder={typedDatePattern()}
          value={text}
          disabled={disabled}
          required={required}
          aria-invalid={shown ? true : undefined}
          aria-describedby={shown ? errorId : labelHidden ? undefined : hintId}
          className={`min-h-10 w-full min-w-0 rounded-sm border border-rule-strong bg-sheet px-3 py-2 text-[0.95rem] text-ink placeholder:text-ink-faint focus:border-ink aria-[invalid=true]:border-bad ${className}`}
          onChange={(e) => typed(e.target.value)}
          onBlur={settle}
          onKeyDown={(e) => {
            if (e.key === "ArrowDown" && e.altKey) {
              e.preventDefault();
              setOpen(true);
            }
          }}
        />
        <button
          type="button"
          aria-label="Open calendar"
          aria-haspopup="dialog"
          aria-expanded={open}
          disabled={disabled}
          className="inline-flex min-h-10 min-w-10 shrink-0 items-center justify-center rounded-sm border border-rule-strong bg-sheet text-ink hover:bg-paper disabled:opacity-50"
          onClick={() => setOpen((o) => !o)}
        >
          <CalendarDays aria-hidden size={18} />
        </button>
      </div>
      {!labelHidden && !shown ? (
        <p id={hintId} className="text-xs text-ink-faint">
          {hintText}
        </p>
      ) : null}
      <FieldError id={errorId} error={shown} />
      {open ? <Calendar label={label} selected={isCalendarDate(iso) ? iso : undefined} min={min} max={max} onPick={pick} onClose={() => setOpen(false)} /> : null}
    </div>
  );
});

/** The month grid: arrows move by day and week, Page Up/Down by month, Home/End to the week's ends, Enter picks, Escape closes. */
function Calendar({ label, selected, min, max, onPick, onClose }: { label: string; selected?: CalendarDate; min?: string; max?: string; onPick: (d: CalendarDate) => void; onClose: () => void }) {
  const today = todayLocal();
  const [focus, setFocus] = useState<CalendarDate>(selected ?? (min && isCalendarDate(min) && today < min ? min : today));
  const gridRef = useRef<HTMLTableElement>(null);
  const titleId = useId();
  const year = Number(focus.slice(0, 4));
  const month = Number(focus.slice(5, 7));
  const first = `${focus.slice(0, 7)}-01`;
  const lead = (new Date(`${first}T00:00:00Z`).getUTCDay() + 6) % 7;
  const start = addDays(first, -lead);
  const weeks = Math.ceil((lead + daysInMonth(year, month)) / 7);

  useEffect(() => {
    gridRef.current?.querySelector<HTMLButtonElement>(`[data-day="${focus}"]`)?.focus();
  }, [focus]);

  const moveMonths = (n: number) => {
    const index = year * 12 + (month - 1) + n;
    const y = Math.floor(index / 12);
    const m = index - y * 12 + 1;
    const d = Math.min(Number(focus.slice(8, 10)), daysInMonth(y, m));
    setFocus(`${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`);
  };

  const onKey = (e: KeyboardEvent) => {
    const weekday = (new Date(`${focus}T00:00:00Z`).getUTCDay() + 6) % 7;
    const moves: Record<string, () => void> = {
      ArrowLeft: () => setFocus(addDays(focus, -1)),
      ArrowRight: () => setFocus(addDays(focus, 1)),
      ArrowUp: () => setFocus(addDays(focus, -7)),
      ArrowDown: () => setFocus(addDays(focus, 7)),
      Home: () => setFocus(addDays(focus, -weekday)),
      End: () => setFocus(addDays(focus, 6 - weekday)),
      PageUp: () => moveMonths(e.shiftKey ? -12 : -1),
      PageDown: () => moveMonths(e.shiftKey ? 12 : 1),
      Escape: onClose,
    };
    const move = moves[e.key];
    if (!move) return;
    e.preventDefault();
    e.stopPropagation();
    move();
  };

  return (
    <div role="dialog" aria-modal="false" aria-labelledby={titleId} className="absolute top-full left-0 z-30 mt-1 w-[19rem] rounded-sm border border-rule-strong bg-sheet p-2 shadow-md" onKeyDown={onKey}>
      <div className="mb-1 flex items-center justify-between gap-2">
        <button type="button" aria-label="Previous month" className="inline-flex min-h-10 min-w-10 items-center justify-center rounded-sm hover:bg-paper" onClick={() => moveMonths(-1)}>
          <ChevronLeft aria-hidden size={18} />
        </button>
        <p id={titleId} className="font-semibold" aria-live="polite">
          <span className="sr-only">{label}: </span>
          {formatMonthYear(`${String(year).padStart(4, "0")}-${String(month).padStart(2, "0")}`)}
        </p>
        <button type="button" aria-label="Next month" className="inline-flex min-h-10 min-w-10 items-center justify-center rounded-sm hover:bg-paper" onClick={() => moveMonths(1)}>
          <ChevronRight aria-hidden size={18} />
        </button>
      </div>
      <table ref={gridRef} role="grid" aria-labelledby={titleId} className="w-full border-collapse text-center text-sm">
        <thead>
          <tr>
            {WEEKDAYS.map((w) => (
              <th key={w.long} scope="col" abbr={w.long} className="py-1 text-xs font-medium text-ink-soft">
                {w.short}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {Array.from({ length: weeks }, (_, w) => (
            <tr key={w}>
              {Array.from({ length: 7 }, (_, d) => {
                const day = addDays(start, w * 7 + d);
                const inMonth = day.slice(0, 7) === focus.slice(0, 7);
                const blocked = outOfRange(day, min, max);
                const isSelected = day === selected;
                return (
                  <td key={day} role="gridcell" aria-selected={isSelected}>
                    <button
                      type="button"
                      data-day={day}
                      tabIndex={day === focus ? 0 : -1}
                      disabled={blocked}
                      aria-label={`${formatLongDate(day)}${day === today ? ", today" : ""}`}
                      aria-current={day === today ? "date" : undefined}
                      className={`min-h-10 w-full min-w-10 rounded-sm tabular ${isSelected ? "bg-ink font-semibold text-sheet" : "hover:bg-paper"} ${inMonth ? "" : "text-ink-faint"} ${day === today && !isSelected ? "underline underline-offset-4" : ""} disabled:cursor-not-allowed disabled:line-through disabled:opacity-40`}
                      onClick={() => onPick(day)}
                    >
                      {Number(day.slice(8, 10))}
                    </button>
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
      <div className="mt-2 flex items-center justify-between gap-2 text-sm">
        <p className="text-ink-soft">
          <span className="sr-only">Selected: </span>
          <span data-testid="calendar-shows">{selected ? formatTypedDate(selected) : typedDatePattern()}</span>
          {selected ? <span className="sr-only"> ({formatShortDate(selected)})</span> : null}
        </p>
        <button type="button" className="min-h-10 rounded-sm px-2 underline underline-offset-2 hover:bg-paper" onClick={onClose}>
          Close
        </button>
      </div>
    </div>
  );
}
