import { Link } from "react-router-dom";
import { PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { CalendarFeedPanel } from "../../features/calendars/calendar-feed-panel.tsx";
import { ProjectHealthSummary } from "../../features/programme/components/programme-summary.tsx";
import { useProjects } from "../../features/projects/api.ts";
import { useMe } from "../../lib/session.ts";
import { WaitingPanel } from "../../features/office/waiting-panel.tsx";

export function OfficeHomePage() {
  const me = useMe();
  const projects = useProjects();
  return (
    <>
      <PageHeader sheet="Site office · Overview" documentTitle="Overview · Site office" title={`Good to see you, ${me.data?.name.split(" ")[0] ?? ""}`} description="Keep the record of each build in one place: programme, updates, photographs and the people who follow them." />
      <WaitingPanel />
      <div className="grid gap-4 lg:grid-cols-2">
        <Sheet label="Projects" title="Builds in this site office">
          <ul className="divide-y divide-rule">
            {(projects.data ?? []).map((p) => (
              <li key={p.id} className="py-2">
                <p className="font-medium">{p.name}</p>
                <p className="text-sm text-ink-soft">
                  {p.operatorName} · <Link className="underline underline-offset-4" to={`/projects/${p.slug}`}>public page</Link> ·{" "}
                  <Link className="underline underline-offset-4" to={`/investors/projects/${p.slug}`}>investor view</Link>
                </p>
              </li>
            ))}
          </ul>
        </Sheet>
        <Sheet label="Programme" title="Programme health">
          <ul className="flex flex-col gap-4">
            {(projects.data ?? []).map((p) => (
              <li key={p.id}>
                {(projects.data ?? []).length > 1 ? <p className="mb-2 font-medium">{p.name}</p> : null}
                <ProjectHealthSummary slug={p.slug} href={`/office/programme?project=${p.slug}`} linkLabel="Open the programme" />
              </li>
            ))}
          </ul>
        </Sheet>
        {me.data?.role === "admin" ? (
          <Sheet label="Mail" title="Outbox">
            <p className="text-sm text-ink-soft">In this demo, mail is kept here instead of being delivered: read each message as it was sent, with its single-use links masked.</p>
            <p className="mt-3">
              <Link to="/office/outbox" className="font-medium text-ink underline underline-offset-4">
                Open the outbox
              </Link>
            </p>
          </Sheet>
        ) : null}
      </div>
      {(projects.data ?? []).map((p) => (
        <CalendarFeedPanel key={p.id} slug={p.slug} projectName={(projects.data ?? []).length > 1 ? p.name : undefined} />
      ))}
    </>
  );
}
