import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { ActionStatusSchema, MitigationInputSchema, RiskToIssueInputSchema, type MitigationInput, type RiskAnswer, type RiskToIssueInput } from "#shared/schemas/risks.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { FieldError, SelectField, SelectOptions, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { FormDialog } from "../../../components/ui/form-dialog.tsx";
import { ChangeHistory } from "../../../components/ui/change-history.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { formatDate, formatMoney } from "../../../lib/format.ts";
import { optionsOf, saveForm } from "../../../lib/forms.ts";
import { useAddMitigation, usePatchMitigation, usePatchRisk, useRiskEvents, useRiskToIssue, type StaffMember } from "../api.ts";
import { ACTION_WORD, CATEGORY_WORD, EVENT_FIELD_WORD, KIND_WORD, percentOf, STATUS_WORD, workingDays } from "../words.ts";
import { BandMark, TrendMark } from "./marks.tsx";

const dateOrNull = { setValueAs: (v: string) => (v === "" ? null : v) };

/** A new action against the risk: what, who, by when. */
function AddMitigation({ riskId, staff, meId }: { riskId: number; staff: readonly StaffMember[]; meId: number }) {
  const add = useAddMitigation();
  const form = useForm<z.input<typeof MitigationInputSchema>, unknown, MitigationInput>({ resolver: zodResolver(MitigationInputSchema), defaultValues: { description: "", ownerId: meId, dueDate: null, status: "planned" } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => add.mutateAsync({ riskId, input: v }), "Action added")) form.reset({ description: "", ownerId: v.ownerId, dueDate: null, status: "planned" });
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="Add an action" className="grid gap-2 border-t border-rule pt-3 sm:grid-cols-[1fr_10rem_9.5rem_auto] sm:items-end">
      <TextField label="New action" error={errors.description?.message} {...form.register("description")} />
      <SelectField label="Owner" options={staff.map((s) => ({ value: String(s.id), label: s.name }))} error={errors.ownerId?.message} {...form.register("ownerId", { valueAsNumber: true })} />
      <DateField label="Due" error={errors.dueDate?.message} {...form.register("dueDate", dateOrNull)} />
      <Button type="submit" busy={add.isPending}>
        Add
      </Button>
      {errors.root ? <FieldError id={`mitigation-${riskId}-root`} error={errors.root.message} /> : null}
    </form>
  );
}

/** The actions against a risk, each with its owner, due date and a status that can be changed in place. */
function Mitigations({ risk, editable, staff, meId }: { risk: RiskAnswer; editable: boolean; staff: readonly StaffMember[]; meId: number }) {
  const patch = usePatchMitigation();
  return (
    <section aria-labelledby={`mit-${risk.id}`} className="flex flex-col gap-2">
      <h3 id={`mit-${risk.id}`} className="font-semibold">
        Actions
      </h3>
      {risk.mitigations.length === 0 ? (
        <p className="text-sm text-ink-soft">No action recorded yet.</p>
      ) : (
        <ul className="flex flex-col divide-y divide-rule text-sm">
          {risk.mitigations.map((m) => (
            <li key={m.id} className="flex flex-wrap items-center justify-between gap-2 py-2" data-mitigation-id={m.id}>
              <div className="min-w-0">
                <p className="font-medium">{m.description}</p>
                <p className="text-xs text-ink-soft">
                  {m.owner.name} · due {formatDate(m.dueDate)}
                  {m.overdue ? <strong className="ml-1 text-bad">▲ overdue</strong> : null}
                </p>
              </div>
              {editable ? (
                <label className="text-sm">
                  <span className="sr-only">Status of “{m.description}”</span>
                  <select
                    className="rounded-sm border border-rule-strong bg-sheet px-2 py-1"
                    value={m.status}
                    disabled={patch.isPending}
                    onChange={(e) => patch.mutate({ id: m.id, patch: { status: e.target.value as MitigationInput["status"], version: m.version } })}
                  >
                    <SelectOptions options={optionsOf(ACTION_WORD, ActionStatusSchema.options)} />
                  </select>
                </label>
              ) : (
                <span>{ACTION_WORD[m.status]}</span>
              )}
            </li>
          ))}
        </ul>
      )}
      {patch.isError ? <Notice tone="error">{patch.error.message}</Notice> : null}
      {editable ? <AddMitigation riskId={risk.id} staff={staff} meId={meId} /> : null}
    </section>
  );
}

/** "It happened": the risk becomes an issue with its impact now, the action and its due date. */
export function IssueForm({ risk, onClose }: { risk: RiskAnswer; onClose: () => void }) {
  const toIssue = useRiskToIssue();
  const form = useForm<z.input<typeof RiskToIssueInputSchema>, unknown, RiskToIssueInput>({ resolver: zodResolver(RiskToIssueInputSchema), defaultValues: { impactNow: "", action: "", dueDate: null, version: risk.version } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => toIssue.mutateAsync({ id: risk.id, input: v }), `${risk.reference} is now an issue`)) onClose();
  });
  return (
    <FormDialog title={`${risk.reference} happened`} onClose={onClose} onSubmit={onSubmit} busy={toIssue.isPending} rootError={errors.root?.message} submitLabel="Open the issue">
      <div className="sm:col-span-2">
        <p className="text-sm text-ink-soft">The risk is marked “became an issue” and an issue is opened from it, keeping its links; both keep their history.</p>
      </div>
      <TextAreaField label="Impact now" rows={3} error={errors.impactNow?.message} {...form.register("impactNow")} />
      <TextAreaField label="Action" rows={3} error={errors.action?.message} {...form.register("action")} />
      <DateField label="Action due" error={errors.dueDate?.message} {...form.register("dueDate", dateOrNull)} />
      <TextField label="Note for the history" error={errors.note?.message} {...form.register("note")} />
    </FormDialog>
  );
}

function RiskHistory({ id, timeZone }: { id: number; timeZone: string }) {
  return <ChangeHistory events={useRiskEvents(id)} fieldWord={EVENT_FIELD_WORD} timeZone={timeZone} testId="risk-history" />;
}

/** One risk or issue read in full, with its actions, its history and (for the lead) what can be done with it. */
export function RiskPanel({ risk, editable, staff, meId, currency, timeZone, onClose, onEdit, onIssue }: { risk: RiskAnswer; editable: boolean; staff: readonly StaffMember[]; meId: number; currency: string; timeZone: string; onClose: () => void; onEdit: () => void; onIssue: () => void }) {
  const patch = usePatchRisk();
  const [showHistory, setShowHistory] = useState(false);
  const setStatus = (status: "open" | "closed") => patch.mutate({ id: risk.id, patch: { status, version: risk.version } });
  const e = risk.costExposure;
  return (
    <Dialog
      open
      title={`${risk.reference} · ${risk.title}`}
      onClose={onClose}
      dismiss="Close"
      wide
      footer={
        editable ? (
          <>
            {risk.kind === "risk" && risk.status === "open" ? <Button onClick={onIssue}>It happened…</Button> : null}
            {risk.status === "open" ? (
              <Button onClick={() => setStatus("closed")} busy={patch.isPending}>
                Close it
              </Button>
            ) : risk.status === "closed" ? (
              <Button onClick={() => setStatus("open")} busy={patch.isPending}>
                Reopen
              </Button>
            ) : null}
            <Button variant="primary" onClick={onEdit}>
              Edit
            </Button>
          </>
        ) : undefined
      }
    >
      <div className="flex flex-col gap-4" data-testid="risk-panel">
        <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm">
          <span>{KIND_WORD[risk.kind]}</span>
          <span>{CATEGORY_WORD[risk.category]}</span>
          <BandMark band={risk.band} score={risk.score} />
          <TrendMark trend={risk.trend} />
          <span>{STATUS_WORD[risk.status]}</span>
          <AudienceMark audience={risk.audience} />
        </div>
        {patch.isError ? <Notice tone="error">{patch.error.message}</Notice> : null}
        <dl className="grid gap-x-4 gap-y-2 text-sm sm:grid-cols-[10rem_1fr]">
          <dt className="text-ink-soft">Owner</dt>
          <dd>{risk.owner.name}</dd>
          <dt className="text-ink-soft">Likelihood × impact</dt>
          <dd className="tabular">
            {risk.likelihood} × {risk.impact} = {risk.score}
            {risk.scoreAtWindowStart !== null ? ` (was ${risk.scoreAtWindowStart} at the start of the window)` : ""}
          </dd>
          {risk.description ? (
            <>
              <dt className="text-ink-soft">Description</dt>
              <dd className="whitespace-pre-line">{risk.description}</dd>
            </>
          ) : null}
          {risk.cause ? (
            <>
              <dt className="text-ink-soft">Cause</dt>
              <dd className="whitespace-pre-line">{risk.cause}</dd>
            </>
          ) : null}
          {risk.effect ? (
            <>
              <dt className="text-ink-soft">Effect</dt>
              <dd className="whitespace-pre-line">{risk.effect}</dd>
            </>
          ) : null}
          {risk.kind === "issue" ? (
            <>
              <dt className="text-ink-soft">Impact now</dt>
              <dd className="whitespace-pre-line">{risk.impactNow || "—"}</dd>
              <dt className="text-ink-soft">Action</dt>
              <dd className="whitespace-pre-line">
                {risk.action || "—"} {risk.dueDate ? `(due ${formatDate(risk.dueDate)})` : ""}
              </dd>
            </>
          ) : null}
          <dt className="text-ink-soft">Cost exposure</dt>
          <dd className="tabular">
            {e
              ? `${formatMoney(e.min, currency)} – ${formatMoney(e.mostLikely, currency)} – ${formatMoney(e.max, currency)} at ${percentOf(e.probability)}; expected ${formatMoney(risk.expectedCost, currency)} (three-point ${formatMoney(risk.expectedCostPert, currency)})`
              : "—"}
          </dd>
          <dt className="text-ink-soft">Schedule exposure</dt>
          <dd className="tabular">{workingDays(risk.scheduleDays)}</dd>
          <dt className="text-ink-soft">Linked to</dt>
          <dd>{[...risk.linkedMilestones, ...risk.linkedBlocks, ...risk.linkedSystems].map((l) => l.name).join(" · ") || "—"}</dd>
          {risk.fromRisk || risk.issue ? (
            <>
              <dt className="text-ink-soft">{risk.fromRisk ? "Opened from" : "Became"}</dt>
              <dd>{(risk.fromRisk ?? risk.issue)?.reference}</dd>
            </>
          ) : null}
        </dl>
        <Mitigations risk={risk} editable={editable && risk.status !== "became_issue"} staff={staff} meId={meId} />
        <section className="flex flex-col gap-1">
          <Button size="sm" variant="ghost" className="self-start" aria-expanded={showHistory} onClick={() => setShowHistory((s) => !s)}>
            {showHistory ? "Hide the history" : "Show the history"}
          </Button>
          {showHistory ? <RiskHistory id={risk.id} timeZone={timeZone} /> : null}
        </section>
      </div>
    </Dialog>
  );
}
