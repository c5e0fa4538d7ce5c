import { formatDayOfInstant, formatInstant } from "#shared/domain/locale-dates.ts";
import { useSuspenseQuery } from "@tanstack/react-query";
import { useDeferredValue, useState } from "react";
import { toast } from "sonner";
import type { DigestRunSummary } from "#shared/schemas/digests.ts";
import { Button } from "../../components/ui/button.tsx";
import { Dialog } from "../../components/ui/dialog.tsx";
import { SelectField } from "../../components/ui/field.tsx";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { NoProjectNotice } from "../../lib/office-page.tsx";
import { digestProjectsQueryOptions, digestRunsQueryOptions, upcomingDigestsQueryOptions, useDigestPreview, useDigestRecipients, usePauseResume, useRunDigest, useSendTest } from "./api.ts";

const FREQUENCY_WORD = { immediate: "As it happens", weekly: "Weekly", monthly: "Monthly" } as const;
const STATUS_WORD = { queued: "Waiting", running: "Sending", done: "Finished", failed: "Stopped by an error", paused: "Paused" } as const;

// Times are the build's, not the browser's: a run "at 08:00" is 08:00 on site.
const when = (iso: string, timeZone?: string) => formatInstant(iso, timeZone);
const day = (iso: string, timeZone?: string) => formatDayOfInstant(iso, timeZone, "short");
/** The last day of a window whose end is exclusive. */
const lastDay = (iso: string, timeZone?: string) => day(new Date(new Date(iso).getTime() - 1).toISOString(), timeZone);

function Progress({ run }: { run: DigestRunSummary }) {
  const done = run.counts.sent + run.counts.failed + run.counts.skipped;
  const total = Math.max(run.counts.total, 1);
  const pct = Math.round((done / total) * 100);
  return (
    <div className="flex items-center gap-2">
      <progress className="h-2 w-32" max={total} value={done} aria-label={`Run ${run.id}: ${done} of ${run.counts.total} handled`} />
      <span className="tabular-nums text-sm">{pct} %</span>
    </div>
  );
}

function RunsTable({ runs, timeZone }: { runs: DigestRunSummary[]; timeZone?: string }) {
  const action = usePauseResume();
  if (runs.length === 0) return <p className="text-ink-soft">No digest has been sent yet.</p>;
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Digest runs">
      <table className="w-full text-left text-sm">
        <thead>
          <tr className="border-b border-rule">
            <th className="py-2 pr-3">Period</th>
            <th className="py-2 pr-3">How often</th>
            <th className="py-2 pr-3">State</th>
            <th className="py-2 pr-3 text-right">Waiting</th>
            <th className="py-2 pr-3 text-right">Sent</th>
            <th className="py-2 pr-3 text-right">Failed</th>
            <th className="py-2 pr-3 text-right">Nothing to send</th>
            <th className="py-2 pr-3 text-right">Took</th>
            <th className="py-2" />
          </tr>
        </thead>
        <tbody>
          {runs.map((r) => (
            <tr key={r.id} className="border-b border-rule align-middle">
              <td className="py-2 pr-3">
                {day(r.windowStart, timeZone)} – {lastDay(r.windowEnd, timeZone)}
              </td>
              <td className="py-2 pr-3">{FREQUENCY_WORD[r.frequency]}</td>
              <td className="py-2 pr-3">{r.status === "running" ? <Progress run={r} /> : STATUS_WORD[r.status]}</td>
              <td className="py-2 pr-3 text-right tabular-nums">{r.counts.queued}</td>
              <td className="py-2 pr-3 text-right tabular-nums">{r.counts.sent}</td>
              <td className="py-2 pr-3 text-right tabular-nums">{r.counts.failed}</td>
              <td className="py-2 pr-3 text-right tabular-nums">{r.counts.skipped}</td>
              <td className="py-2 pr-3 text-right tabular-nums">{r.durationSeconds === null ? "—" : `${r.durationSeconds} s`}</td>
              <td className="py-2 text-right">
                {r.status === "running" || r.status === "queued" ? (
                  <Button size="sm" onClick={() => action.mutate({ id: r.id, action: "pause" })}>
                    Pause
                  </Button>
                ) : r.status === "paused" ? (
                  <Button size="sm" onClick={() => action.mutate({ id: r.id, action: "resume" })}>
                    Resume
                  </Button>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function PreviewPanel({ project, timeZone }: { project: string; timeZone?: string }) {
  const recipients = useDigestRecipients(project);
  const [chosen, setChosen] = useState<number | null>(null);
  const preview = useDigestPreview(chosen);
  const rows = recipients.data?.rows ?? [];
  return (
    <div className="flex flex-col gap-3">
      <SelectField
        label="Subscriber"
        value={chosen === null ? "" : String(chosen)}
        onChange={(e) => setChosen(e.target.value ? Number(e.target.value) : null)}
        options={[{ value: "", label: rows.length ? "Choose a subscriber" : "No confirmed subscriber yet" }, ...rows.map((s) => ({ value: String(s.id), label: `${s.name} <${s.email}> · ${s.audience === "investor" ? "investor content" : "public content"} · ${FREQUENCY_WORD[s.frequency]}` }))]}
        hint="What this person would receive if their digest went now: their window, audience and topics."
      />
      {preview.isFetching ? <Spinner /> : null}
      {preview.isError ? <Notice tone="error">{preview.error.message}</Notice> : null}
      {preview.data ? (
        <div className="flex flex-col gap-2">
          {!preview.data.wouldSend ? <Notice tone="caution">Nothing new for this subscriber since their last digest: no e-mail would be sent.</Notice> : null}
          <p>
            <span className="label-caps">Subject</span> <span data-testid="digest-preview-subject">{preview.data.subject}</span>
          </p>
          <p className="text-sm text-ink-soft">
            {preview.data.preheader} · news since {when(preview.data.windowStart, timeZone)}
          </p>
          {/* No scripts run in the preview (no allow-scripts); allow-same-origin lets it load this site's
              own images, which answer with a same-origin resource policy an opaque sandbox would refuse. */}
          <iframe title="Digest preview" className="h-[36rem] w-full border border-rule bg-white" sandbox="allow-same-origin" srcDoc={preview.data.html} />
        </div>
      ) : null}
    </div>
  );
}

/** Primes the builds, and the first one's runs and upcoming runs, which the page opens on. */
export const digestsLoader: RouteLoader = (qc) => () =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const first = (await qc.ensureQueryData(digestProjectsQueryOptions()))[0]?.slug;
    if (first) await Promise.all([qc.ensureQueryData(digestRunsQueryOptions(first)), qc.ensureQueryData(upcomingDigestsQueryOptions(first))]);
  });

/** The build's upcoming runs and the history of its runs. */
function BuildRuns({ project, timeZone }: { project: string; timeZone?: string }) {
  const upcoming = useSuspenseQuery(upcomingDigestsQueryOptions(project)).data;
  const runs = useSuspenseQuery(digestRunsQueryOptions(project)).data;
  return (
    <>
      <Sheet label="Next" title="Upcoming runs">
        <ul className="flex flex-col gap-1">
          {upcoming.map((u) => (
            <li key={`${u.project.slug}-${u.frequency}`}>
              <strong>{FREQUENCY_WORD[u.frequency]}</strong>: {when(u.at, u.project.timeZone)} ({u.project.timeZone}), covering {day(u.windowStart, u.project.timeZone)} – {lastDay(u.windowEnd, u.project.timeZone)}, to {u.recipients} {u.recipients === 1 ? "subscriber" : "subscribers"}
            </li>
          ))}
        </ul>
      </Sheet>
      <Sheet label="History" title="Runs">
        <RunsTable runs={runs} timeZone={timeZone} />
      </Sheet>
    </>
  );
}

/** The site office's Digests page: upcoming runs, history, a subscriber's preview, a test, run now, pause and resume. */
export function DigestsPage() {
  const projects = useSuspenseQuery(digestProjectsQueryOptions()).data;
  const [picked, setPicked] = useState("");
  const project = picked || projects[0]?.slug || "";
  // Another build's runs appear once they are here; until then the last ones stay.
  const shown = useDeferredValue(project);
  const timeZone = projects.find((p) => p.slug === shown)?.timeZone;
  const runNow = useRunDigest();
  const test = useSendTest();
  // A run mails every subscriber at that frequency, so it is asked for twice: the button, then the dialog's own.
  const [confirming, setConfirming] = useState<"weekly" | "monthly" | null>(null);
  const start = (frequency: "weekly" | "monthly") =>
    runNow.mutate(
      { projectSlug: project, frequency },
      {
        onSuccess: (r) => toast.success(r.status === "done" ? "That period was already sent." : "The run has started."),
        onError: (e) => toast.error(e.message),
        onSettled: () => setConfirming(null),
      },
    );
  return (
    <>
      <PageHeader
        sheet="Site office · Digests"
        title="Digests"
        description="Progress e-mails to subscribers: weekly on Monday at 08:00 and monthly on the first working day at 08:00, in the build's time zone, and one e-mail per update for those who follow as it happens."
        actions={
          <div className="flex flex-wrap gap-2">
            <Button disabled={!project} busy={runNow.isPending && confirming === "weekly"} onClick={() => setConfirming("weekly")}>
              Run last week now
            </Button>
            <Button disabled={!project} busy={runNow.isPending && confirming === "monthly"} onClick={() => setConfirming("monthly")}>
              Run last month now
            </Button>
            <Button
              disabled={!project}
              busy={test.isPending}
              onClick={() => test.mutate({ projectSlug: project, audience: "public" }, { onSuccess: () => toast.success("A test digest is on its way to you."), onError: (e) => toast.error(e.message) })}
            >
              Send a test to me
            </Button>
          </div>
        }
      />
      <Dialog
        open={confirming !== null}
        title={confirming === "monthly" ? "Send last month's digest now?" : "Send last week's digest now?"}
        onClose={() => setConfirming(null)}
        dismiss="Cancel"
        footer={
          <Button variant="primary" busy={runNow.isPending} onClick={() => confirming && start(confirming)}>
            Send it now
          </Button>
        }
      >
        <p>
          Every confirmed subscriber who takes the {confirming === "monthly" ? "monthly" : "weekly"} digest of {projects.find((p) => p.slug === project)?.name ?? "this build"} gets it now, instead of at the next scheduled time. A
          period already sent is not sent again.
        </p>
      </Dialog>
      <div className="flex flex-col gap-6">
        {projects.length > 1 ? <SelectField label="Build" value={project} onChange={(e) => setPicked(e.target.value)} options={projects.map((p) => ({ value: p.slug, label: p.name }))} /> : null}
        {shown ? (
          <>
            <BuildRuns project={shown} timeZone={timeZone} />
            <Sheet label="Preview" title="What a subscriber would get now">
              <PreviewPanel project={shown} timeZone={timeZone} />
            </Sheet>
          </>
        ) : (
          <NoProjectNotice />
        )}
      </div>
    </>
  );
}
