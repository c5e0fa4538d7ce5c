import { useSuspenseQuery, type QueryClient } from "@tanstack/react-query";
import type { ComponentType, ReactNode } from "react";
import { Link, NavLink, useParams, useSearchParams } from "react-router-dom";
import type { Role } from "#shared/schemas/common.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { WHOLE_PROGRAMME_NOTE } from "#shared/domain/programme-health.ts";
import { Notice, PageHeader } from "../../components/ui/sheet.tsx";
import { budgetChangesQueryOptions, budgetPositionQueryOptions } from "../../features/budget/api.ts";
import { CalendarFeedPanel } from "../../features/calendars/calendar-feed-panel.tsx";
import { InvestorCost } from "../../features/budget/investor-cost.tsx";
import { decisionsQueryOptions } from "../../features/decisions/api.ts";
import { InvestorDecisions } from "../../features/decisions/investor-decisions.tsx";
import { investorDocumentsQueryOptions } from "../../features/documents/investor-api.ts";
import { InvestorDocument, InvestorDocuments } from "../../features/documents/investor-documents.tsx";
import { reportQueryOptions, reportsQueryOptions } from "../../features/reports/api.ts";
import { InvestorReport, InvestorReports } from "../../features/reports/components/investor-reports.tsx";
import { InvestorProgramme } from "../../features/programme/components/investor-programme.tsx";
import { ProjectHealthSummary } from "../../features/programme/components/programme-summary.tsx";
import { projectQueryOptions, projectsQueryOptions } from "../../features/projects/api.ts";
import { InvestorFacility } from "../../features/public-site/components/facility-investor.tsx";
import { ReadinessAtAGlance } from "../../features/public-site/components/readiness-glance.tsx";
import { riskSummaryQueryOptions, risksQueryOptions } from "../../features/risks/api.ts";
import { InvestorRisks } from "../../features/risks/investor-risks.tsx";
import { idParam, INVESTOR_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { useMe } from "../../lib/session.ts";
import { WithReportParts } from "./report-parts.tsx";

/** Who may read money figures: marketing reads risks, decisions and documents, never the cost (decision 040). */
const MONEY_ROLES: readonly Role[] = ["investor", "lead", "admin"];

interface Section {
  path: string;
  label: string;
  roles?: readonly Role[];
}

/** The parts of one build's record in the investor room, in the order an investor reads them. */
const SECTIONS: readonly Section[] = [
  { path: "", label: "Programme and capacity" },
  { path: "risks", label: "Risks" },
  { path: "decisions", label: "Decisions" },
  { path: "cost", label: "Cost", roles: MONEY_ROLES },
  { path: "documents", label: "Documents" },
  { path: "reports", label: "Reports", roles: MONEY_ROLES },
];

const sectionHref = (slug: string, path: string) => `/investors/projects/${slug}${path ? `/${path}` : ""}`;

/** The sections of a project, as tabs under its head; on a phone they scroll sideways. */
function ProjectSections({ slug }: { slug: string }) {
  const role = useMe().data?.role;
  return (
    <nav aria-label="Project sections" className="-mx-4 mb-6 overflow-x-auto px-4 sm:mx-0 sm:px-0">
      <ul className="flex gap-1 border-b border-rule">
        {SECTIONS.filter((s) => !s.roles || (role && s.roles.includes(role))).map((s) => (
          <li key={s.path}>
            <NavLink
              to={sectionHref(slug, s.path)}
              end={s.path === ""}
              className={({ isActive }) => `-mb-px block whitespace-nowrap border-b-2 px-3 py-2 text-sm ${isActive ? "border-ink font-semibold text-ink" : "border-transparent text-ink-soft hover:text-ink"}`}
            >
              {s.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}

/**
 * A page of one build in the investor room (`:slug`): the head every such page has (the build's
 * name, a line, the sections), then `children` with the build's slug and the project as read.
 */
/** A section of a project in the investor room: its head, the sections' links, and the body (`body`, or `children` given the slug and project). */
function SectionPage({ sheet, description, actions, body: Body, children }: { sheet: string; description?: string; actions?: ReactNode; body?: ComponentType<{ slug: string; project: Project }>; children?: (slug: string, project: Project) => ReactNode }) {
  const { slug = "" } = useParams();
  const project = useSuspenseQuery(projectQueryOptions(slug)).data;
  return (
    <>
      <PageHeader sheet={`Investor room · ${sheet}`} title={project.name} documentTitle={`${sheet} · ${project.name}`} description={description ?? project.description} actions={actions} />
      <ProjectSections slug={slug} />
      {Body ? <Body slug={slug} project={project} /> : children?.(slug, project)}
    </>
  );
}

export const investorHomeLoader: RouteLoader = (qc) => () => primeWhenAllowed(qc, INVESTOR_ROLES, () => qc.ensureQueryData(projectsQueryOptions()));

export const investorProjectLoader: RouteLoader = (qc) => ({ params }) => primeWhenAllowed(qc, INVESTOR_ROLES, () => qc.ensureQueryData(projectQueryOptions(params.slug ?? "")));

export function InvestorHomePage() {
  const projects = useSuspenseQuery(projectsQueryOptions());
  const role = useMe().data?.role;
  return (
    <>
      <PageHeader sheet="Investor room" title="Your projects" description={`Programme health, capacity, risks, decisions, cost and documents of the builds you follow. ${WHOLE_PROGRAMME_NOTE}`} />
      <ul className="grid gap-4 lg:grid-cols-2">
          {projects.data.map((p) => (
            <li key={p.id} className="flex flex-col gap-3 border border-rule bg-sheet p-5">
              <div>
                <p className="label-caps">{p.operatorName}</p>
                <h2 className="mt-1 text-lg font-semibold">
                  <Link to={`/investors/projects/${p.slug}`} className="underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
                    {p.name}
                  </Link>
                </h2>
                <p className="mt-1 line-clamp-2 text-sm text-ink-soft">{p.description}</p>
              </div>
              <ProjectHealthSummary slug={p.slug} href={`/investors/projects/${p.slug}`} linkLabel="Programme health, charts and what moved" />
              <ul aria-label={`The record of ${p.name}`} className="flex flex-wrap gap-x-4 gap-y-1 border-t border-rule pt-3 text-sm">
                {SECTIONS.filter((s) => s.path !== "" && (!s.roles || (role && s.roles.includes(role)))).map((s) => (
                  <li key={s.path}>
                    <Link to={sectionHref(p.slug, s.path)} className="inline-flex min-h-6 items-center font-medium underline underline-offset-4">
                      {s.label}
                    </Link>
                  </li>
                ))}
              </ul>
            </li>
          ))}
        </ul>
    </>
  );
}

export function InvestorProjectPage() {
  return (
    <SectionPage
      sheet="Programme and capacity"
      actions={
        <a href="#facility" className="text-sm font-medium underline underline-offset-4">
          Capacity ramp and readiness ↓
        </a>
      }
    >
      {(slug, project) => (
        <div className="flex flex-col gap-6">
          <ReadinessAtAGlance slug={slug} />
          <InvestorProgramme slug={slug} currency={project.currency} />
          <InvestorFacility slug={slug} />
          <CalendarFeedPanel slug={slug} />
        </div>
      )}
    </SectionPage>
  );
}

/** A section's loader: for a role that may read it, the project and what the section reads of it. */
function sectionLoader(roles: readonly Role[], reads: (qc: QueryClient, slug: string) => Promise<unknown>[]): RouteLoader {
  return (qc) =>
    ({ params }) =>
      primeWhenAllowed(qc, roles, () => {
        const slug = params.slug ?? "";
        return Promise.all([qc.ensureQueryData(projectQueryOptions(slug)), ...reads(qc, slug)]);
      });
}

export const investorRisksLoader = sectionLoader(INVESTOR_ROLES, (qc, slug) => [qc.ensureQueryData(risksQueryOptions(slug)), qc.ensureQueryData(riskSummaryQueryOptions(slug))]);

export function InvestorRisksPage() {
  return <SectionPage sheet="Risks" description="What could go wrong, who owns it and what is being done, and what has already happened. Only the risks shared with investors." body={InvestorRisks} />;
}

export const investorDecisionsLoader = sectionLoader(INVESTOR_ROLES, (qc, slug) => [qc.ensureQueryData(decisionsQueryOptions(slug))]);

export function InvestorDecisionsPage() {
  return <SectionPage sheet="Decisions" description="What the investors, the lender or the board are asked to decide, and by when; and what was decided." body={InvestorDecisions} />;
}

export const investorCostLoader = sectionLoader(MONEY_ROLES, (qc, slug) => [qc.ensureQueryData(budgetPositionQueryOptions(slug)), qc.ensureQueryData(budgetChangesQueryOptions(slug))]);

export function InvestorCostPage() {
  const role = useMe().data?.role;
  const allowed = role !== undefined && MONEY_ROLES.includes(role);
  return (
    <SectionPage sheet="Cost" description="Where the money stands: the approved budget after changes, the contingency, and what the build may cost in the end.">
      {(slug) => (allowed ? <InvestorCost slug={slug} /> : <Notice title="Not shown to your role">The cost of a build is read by its investors and its project lead.</Notice>)}
    </SectionPage>
  );
}

export const investorDocumentsLoader = sectionLoader(INVESTOR_ROLES, (qc, slug) => [qc.ensureQueryData(investorDocumentsQueryOptions(slug))]);

export function InvestorDocumentsPage() {
  return <SectionPage sheet="Documents" description="Monitoring reports, lender packs, certificates and the other papers of the build." body={InvestorDocuments} />;
}

export function InvestorDocumentPage() {
  const { id } = useParams();
  const [search] = useSearchParams();
  const version = search.get("version");
  return (
    <SectionPage sheet="Documents" description="Your own copy: each page carries your name, your organisation and the time.">
      {(slug) => <InvestorDocument slug={slug} id={idParam(id)} version={version ? Number(version) : undefined} />}
    </SectionPage>
  );
}

// The monthly reports carry the cost, so they are read by whoever reads the cost (decision 046).
export const investorReportsLoader = sectionLoader(MONEY_ROLES, (qc, slug) => [qc.ensureQueryData(reportsQueryOptions(slug))]);
export const investorReportLoader: RouteLoader = (qc) => (args) =>
  sectionLoader(MONEY_ROLES, (q) => [q.ensureQueryData(reportQueryOptions(idParam(args.params.id)))])(qc)(args);

function MoneyOnly({ children }: { children: ReactNode }) {
  const role = useMe().data?.role;
  if (role === undefined || !MONEY_ROLES.includes(role)) return <Notice title="Not shown to your role">The monthly reports carry the cost of the build: they are read by its investors and its project lead.</Notice>;
  return <>{children}</>;
}

export function InvestorReportsPage() {
  return (
    <SectionPage sheet="Reports" description="The monthly report: where the build stood at each month's end, with the project lead's commentary. Read it here or as your own stamped PDF.">
      {(slug, project) => (
        <MoneyOnly>
          <InvestorReports slug={slug} timeZone={project.timeZone} />
        </MoneyOnly>
      )}
    </SectionPage>
  );
}

export function InvestorReportPage() {
  const { id } = useParams();
  const [search] = useSearchParams();
  return (
    <SectionPage sheet="Reports" description="The report as it was issued. Your PDF copy carries your name, your organisation and the time on every page.">
      {(slug) => (
        <MoneyOnly>
          <WithReportParts>
            <InvestorReport slug={slug} id={idParam(id)} asPdf={search.get("as") === "pdf"} />
          </WithReportParts>
        </MoneyOnly>
      )}
    </SectionPage>
  );
}
