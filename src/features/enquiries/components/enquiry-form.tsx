import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { Controller, useForm } from "react-hook-form";
import type { z } from "zod";
import { CapacityEnquirySchema, EnquiryInputSchema, EnquiryKindSchema, VISIT_MAX_PARTY, type EnquiryKind } from "#shared/schemas/enquiries.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { Button } from "../../../components/ui/button.tsx";
import { TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { useSendEnquiry } from "../api.ts";
import { VisitRules } from "./visit-rules.tsx";
import { submitting } from "../../../lib/forms.ts";

type Values = z.input<typeof EnquiryInputSchema>;
type Errors = Record<string, { message?: string } | Array<{ message?: string } | undefined> | undefined>;

const KIND_CHOICE: Record<EnquiryKind, { label: string; hint: string }> = {
  capacity: { label: "Capacity", hint: "Racks and power, and when you need them" },
  visit: { label: "A site visit", hint: "An escorted visit of the build" },
  general: { label: "A question", hint: "Anything else about the build" },
};

function PreferredDates({ value, onChange, errors }: { value: string[]; onChange: (v: string[]) => void; errors: Errors[string] }) {
  const dates = value.length ? value : [""];
  const list = Array.isArray(errors) ? errors : [];
  const whole = !Array.isArray(errors) ? errors?.message : undefined;
  return (
    <fieldset className="flex flex-col gap-2">
      <legend className="text-sm font-medium">Preferred dates (up to three)</legend>
      {dates.map((d, i) => (
        <div key={i} className="flex items-end gap-2">
          <div className="flex-1">
            <DateField label={`Preferred date ${i + 1}`} value={d} error={list[i]?.message} onChange={(e) => onChange(dates.map((x, j) => (j === i ? e.target.value : x)))} />
          </div>
          {dates.length > 1 ? (
            <Button size="sm" variant="ghost" aria-label={`Remove preferred date ${i + 1}`} onClick={() => onChange(dates.filter((_, j) => j !== i))}>
              Remove
            </Button>
          ) : null}
        </div>
      ))}
      {dates.length < 3 ? (
        <div>
          <Button size="sm" onClick={() => onChange([...dates, ""])}>
            Add another date
          </Button>
        </div>
      ) : null}
      {whole ? (
        <p role="alert" className="flex items-start gap-1 text-sm text-bad">
          <span aria-hidden>▲</span>
          {whole}
        </p>
      ) : null}
    </fieldset>
  );
}

/** The capacity block an enquiry starts from ("Ask about this block" on the facility page). */
export interface EnquiryAbout {
  name: string;
  racks: number;
  kwPerRack: number;
}

/**
 * The line that names the block at the head of the message: the enquiry schema has no block
 * field, and the message is what marketing reads first, in the office and in the e-mail.
 */
export function aboutLine(about: EnquiryAbout): string {
  return `About ${about.name} (${about.racks} racks, up to ${about.kwPerRack} kW per rack).`;
}

/** Racks and density from the block, where the enquiry's limits take them. */
function prefillOf(about: EnquiryAbout | undefined): { racks?: number; kwPerRack?: number } {
  if (!about) return {};
  const racks = CapacityEnquirySchema.shape.racks.safeParse(about.racks);
  const kw = CapacityEnquirySchema.shape.kwPerRack.safeParse(about.kwPerRack);
  return { ...(racks.success ? { racks: racks.data } : {}), ...(kw.success ? { kwPerRack: kw.data } : {}) };
}

/** An enquiry about one project: capacity, a site visit (with the site rules) or a question; pre-filled from a block when `about` names one. */
export function EnquiryForm({ project, about: given }: { project: Project; about?: EnquiryAbout }) {
  const send = useSendEnquiry(project.slug);
  const [done, setDone] = useState<string | null>(null);
  const [about, setAbout] = useState(given);
  const kinds = EnquiryKindSchema.options.filter((k) => k !== "visit" || project.visitsOffered);
  const form = useForm<Values>({
    resolver: zodResolver(EnquiryInputSchema),
    // Fields of the kinds not chosen leave the values, so the strict schema sees only this kind's.
    shouldUnregister: true,
    defaultValues: { kind: "capacity", name: "", email: "", organisation: "", phone: "", message: "", website: "", ...prefillOf(given) } as Values,
  });
  const kind = form.watch("kind");
  const errors = form.formState.errors as unknown as Errors;
  const msg = (name: string) => {
    const e = errors[name];
    return Array.isArray(e) ? undefined : e?.message;
  };
  const onSubmit = submitting(form, async (v) => {
    const input = v as z.output<typeof EnquiryInputSchema>;
    const r = await send.mutateAsync(about ? { ...input, message: [aboutLine(about), input.message?.trim()].filter(Boolean).join("\n\n") } : input);
    setDone(r.message);
  }, "message");
  if (done) return <Notice title="Enquiry sent" testId="enquiry-done">{done}</Notice>;
  const number = { setValueAs: (v: string) => (v === "" ? Number.NaN : Number(v)) };
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5">
      <fieldset className="flex flex-col gap-2">
        <legend className="text-sm font-medium">What is it about?</legend>
        <div className="grid gap-2 sm:grid-cols-3">
          {kinds.map((k) => (
            <label key={k} className={`flex cursor-pointer flex-col border p-3 text-sm ${kind === k ? "border-ink bg-paper" : "border-rule"}`}>
              <span className="flex items-center gap-2 font-medium">
                <input type="radio" value={k} className="size-4" {...form.register("kind")} />
                {KIND_CHOICE[k].label}
              </span>
              <span className="mt-1 text-ink-soft">{KIND_CHOICE[k].hint}</span>
            </label>
          ))}
        </div>
      </fieldset>

      {about ? (
        <div className="flex flex-wrap items-baseline justify-between gap-2 border-l-4 border-ink bg-paper px-3 py-2 text-sm" data-testid="enquiry-about">
          <p>
            <span className="font-semibold">Asking about {about.name}</span>: {about.racks} racks, up to {about.kwPerRack} kW per rack. The message starts with this line.
          </p>
          <button type="button" className="underline underline-offset-4" onClick={() => setAbout(undefined)}>
            Not about this block
          </button>
        </div>
      ) : null}

      {kind === "capacity" ? (
        <div className="grid gap-4 sm:grid-cols-3">
          <TextField label="Racks" type="number" inputMode="numeric" min={1} step={1} error={msg("racks")} {...form.register("racks", number)} />
          <TextField label="kW per rack" type="number" inputMode="decimal" min={0.5} step={0.5} error={msg("kwPerRack")} {...form.register("kwPerRack", number)} />
          <DateField label="Date needed" error={msg("neededBy")} {...form.register("neededBy")} />
        </div>
      ) : null}

      {kind === "visit" ? (
        <div className="flex flex-col gap-4">
          <VisitRules />
          <Controller control={form.control} name="preferredDates" defaultValue={[""]} render={({ field }) => <PreferredDates value={field.value ?? [""]} onChange={field.onChange} errors={errors.preferredDates} />} />
          <TextField label="Number of people" type="number" inputMode="numeric" min={1} max={VISIT_MAX_PARTY} step={1} hint={`At most ${VISIT_MAX_PARTY} on one escorted visit.`} error={msg("partySize")} {...form.register("partySize", number)} />
          <div className="flex flex-col gap-1">
            <label className="flex items-start gap-2 text-sm">
              <input type="checkbox" className="mt-0.5 size-4" {...form.register("rulesAccepted")} />
              I have read the site rules, and everyone in my party will follow them.
            </label>
            {msg("rulesAccepted") ? (
              <p role="alert" className="flex items-start gap-1 text-sm text-bad">
                <span aria-hidden>▲</span>
                {msg("rulesAccepted")}
              </p>
            ) : null}
          </div>
        </div>
      ) : null}

      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Your name" autoComplete="name" error={msg("name")} {...form.register("name")} />
        <TextField label="E-mail address" type="email" autoComplete="email" error={msg("email")} {...form.register("email")} />
        <TextField label="Organisation (optional)" autoComplete="organization" error={msg("organisation")} {...form.register("organisation")} />
        <TextField label="Telephone (optional)" type="tel" autoComplete="tel" error={msg("phone")} {...form.register("phone")} />
      </div>
      <TextAreaField label={kind === "general" ? "Your question" : "Anything else (optional)"} rows={4} error={msg("message")} {...form.register("message")} />

      {/* For robots only: people never see or reach this field. */}
      <div className="sr-only" aria-hidden="true">
        <label>
          Website (leave this empty)
          <input type="text" tabIndex={-1} autoComplete="off" {...form.register("website")} />
        </label>
      </div>

      <div>
        <Button type="submit" variant="primary" busy={send.isPending}>
          Send the enquiry
        </Button>
      </div>
      {send.error instanceof ApiError && !Object.keys(send.error.fields).length ? <Notice tone="error">{send.error.message}</Notice> : null}
    </form>
  );
}
