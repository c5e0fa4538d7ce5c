import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery, type QueryKey, type UseSuspenseQueryOptions } from "@tanstack/react-query";
import { useDeferredValue, useState, type ReactNode } from "react";
import { Controller, useForm } from "react-hook-form";
import { Link, useParams, useRouteError, useSearchParams } from "react-router-dom";
import { toast } from "sonner";
import type { z } from "zod";
import {
  INVESTOR_CONSENT,
  FrequencySchema,
  InterestSchema,
  InvestorDigestInputSchema,
  PreferencesInputSchema,
  SubscriberStatusSchema,
  type InvestorDigestSetting,
  type PreferencesView,
  type SubscriberFilterQuery,
} from "#shared/schemas/subscribers.ts";
import { Button, buttonClass } from "../../components/ui/button.tsx";
import { SelectField, TextField } from "../../components/ui/field.tsx";
import { pageFromParams, UrlPager } from "../../components/ui/pager.tsx";
import { Notice, PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { SYSTEM_WORD } from "../../lib/format.ts";
import { INVESTOR_ROLES, OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { meQueryOptions } from "../../lib/session.ts";
import { useTitle } from "../../lib/use-title.ts";
import {
  confirmationQueryOptions,
  investorDigestQueryOptions,
  myDigestQueryOptions,
  myDigestsQueryOptions,
  pastDigestQueryOptions,
  pastDigestsQueryOptions,
  preferencesQueryOptions,
  subscribersCsvUrl,
  subscribersQueryOptions,
  subscriptionOptionsQueryOptions,
  subscriptionProjectsQueryOptions,
  unsubscribeQueryOptions,
  useConfirm,
  useLeaveFromPreferences,
  useSetInvestorDigest,
  useUnsubscribe,
  useUpdatePreferences,
} from "./api.ts";
import { ConsentNote } from "./components/consent-note.tsx";
import { DigestArchive } from "./components/digest-archive.tsx";
import { ImportPanel } from "./components/import-panel.tsx";
import { SubscribeForm } from "./components/subscribe-form.tsx";
import { SubscribersTable } from "./components/subscribers-table.tsx";
import { TopicsPicker } from "./components/topics-picker.tsx";
import { FREQUENCY_SHORT, FREQUENCY_WORD, INTEREST_SHORT, STATUS_LOOK } from "./words.ts";
import { submitting } from "../../lib/forms.ts";

/** One column on the paper, for the pages a visitor reaches from a form or an e-mail. */
function PublicSheet({ label, title, lead, children, documentTitle }: { label: string; title: string; lead?: ReactNode; children: ReactNode; documentTitle?: string }) {
  useTitle(documentTitle ?? title, documentTitle ? undefined : label);
  return (
    <div className="mx-auto w-full max-w-2xl px-4 py-8 sm:py-12">
      <p className="label-caps">{label}</p>
      <h1 className="mt-1 text-2xl font-semibold tracking-tight sm:text-3xl">{title}</h1>
      {lead ? <p className="mt-2 text-ink-soft">{lead}</p> : null}
      <div className="mt-6 border border-rule bg-sheet p-4 sm:p-6">{children}</div>
    </div>
  );
}

function LinkProblem({ error }: { error: Error }) {
  const code = error instanceof ApiError ? error.code : "";
  return (
    <Notice tone="error" title={code === "token_expired" ? "This link has expired" : "This link cannot be used"}>
      {error.message}{" "}
      <Link to="/subscribe" className="underline underline-offset-4">
        Subscribe again
      </Link>
    </Notice>
  );
}

/**
 * The error element of a page opened from a signed link: a link that is malformed, expired or
 * no longer in use is the visitor's everyday problem, so it is said in the page's own words.
 */
function linkErrorElement(title: string) {
  return function SubscriptionLinkError() {
    const error = useRouteError();
    return (
      <PublicSheet label="Subscription" title={title}>
        <LinkProblem error={error instanceof Error ? error : new Error("This link cannot be opened.")} />
      </PublicSheet>
    );
  };
}

export const ConfirmationLinkError = linkErrorElement("Confirm your subscription");
export const PreferencesLinkError = linkErrorElement("Your preferences");
export const UnsubscribeLinkError = linkErrorElement("Unsubscribe");

/** Primes the subscription form's options (areas, systems, consent wording) of the build. */
export const projectSubscribeLoader: RouteLoader = (qc) => async ({ params }) => {
  await qc.ensureQueryData(subscriptionOptionsQueryOptions(params.slug ?? ""));
  return null;
};

/** Primes the builds and the first one's form, which the page opens on. */
export const subscribeLoader: RouteLoader = (qc) => async () => {
  const projects = await qc.ensureQueryData(subscriptionProjectsQueryOptions());
  if (projects[0]) await qc.ensureQueryData(subscriptionOptionsQueryOptions(projects[0].slug));
  return null;
};

export const confirmationLoader: RouteLoader = (qc) => async ({ params }) => {
  await qc.ensureQueryData(confirmationQueryOptions(params.token ?? ""));
  return null;
};

export const preferencesLoader: RouteLoader = (qc) => async ({ params }) => {
  await qc.ensureQueryData(preferencesQueryOptions(params.token ?? ""));
  await qc.ensureQueryData(pastDigestsQueryOptions(params.token ?? "", 1));
  return null;
};

export const unsubscribeLoader: RouteLoader = (qc) => async ({ params }) => {
  await qc.ensureQueryData(unsubscribeQueryOptions(params.token ?? ""));
  return null;
};

function SubscribeFor({ slug }: { slug: string }) {
  const options = useSuspenseQuery(subscriptionOptionsQueryOptions(slug)).data;
  return <SubscribeForm key={slug} options={options} />;
}

/** /projects/:slug/subscribe */
export function ProjectSubscribePage() {
  const { slug = "" } = useParams();
  const options = useSuspenseQuery(subscriptionOptionsQueryOptions(slug)).data;
  return (
    <PublicSheet label="Progress by e-mail" title={`Follow ${options.project.name}`} documentTitle={`Progress by e-mail · ${options.project.name}`} lead="Progress e-mails from the site: what was built, commissioned and moved on the programme. Nothing is sent until you confirm.">
      <SubscribeForm key={slug} options={options} />
    </PublicSheet>
  );
}

/** /subscribe — the same form, with the project to choose. */
export function SubscribePage() {
  const projects = useSuspenseQuery(subscriptionProjectsQueryOptions()).data;
  const [picked, setPicked] = useState("");
  const slug = picked || projects[0]?.slug || "";
  // Another build's form appears once its options are here; until then the chosen one stays.
  const shown = useDeferredValue(slug);
  return (
    <PublicSheet label="Progress by e-mail" title="Subscribe to progress e-mails" lead="Choose a build, what you follow and how often. Nothing is sent until you confirm from the e-mail we send.">
      <div className="flex flex-col gap-4">
        {projects.length > 1 ? <SelectField label="Build" options={projects.map((p) => ({ value: p.slug, label: p.name }))} value={slug} onChange={(e) => setPicked(e.target.value)} /> : null}
        {shown ? <SubscribeFor slug={shown} /> : <p className="text-ink-soft">No builds are published yet.</p>}
      </div>
    </PublicSheet>
  );
}

/** The token in the address of a page opened from a signed link, and what the link shows. */
function useLinkView<T, K extends QueryKey>(read: (token: string) => UseSuspenseQueryOptions<T, Error, T, K>): { token: string; view: T } {
  const { token = "" } = useParams();
  return { token, view: useSuspenseQuery(read(token)).data };
}

/**
 * /subscriptions/confirm/:token — opening the page changes nothing (mail scanners open
 * links); only the button confirms.
 */
export function ConfirmSubscriptionPage() {
  const { token, view: v } = useLinkView(confirmationQueryOptions);
  const confirm = useConfirm(token);
  if (confirm.isSuccess) {
    return (
      <PublicSheet label={v.project.name} title="Subscription confirmed">
        <Notice title="You are subscribed">
          Progress e-mails about {v.project.name} will go to {v.email}. Every e-mail carries a link to change your choices or leave.
        </Notice>
        <p className="mt-4">
          <Link to={confirm.data.preferencesPath} className="font-medium text-ink underline underline-offset-4">
            Choose topics and frequency
          </Link>
        </p>
      </PublicSheet>
    );
  }
  if (v.status !== "pending") {
    return (
      <PublicSheet label={v.project.name} title="Confirm your subscription">
        <Notice title={v.status === "confirmed" ? "Already confirmed" : "This link is no longer in use"}>
          {v.status === "confirmed" ? `${v.email} is already subscribed. Use the links in our e-mails to change your choices.` : "Subscribe again to receive a new confirmation link."}
        </Notice>
      </PublicSheet>
    );
  }
  return (
    <PublicSheet label={v.project.name} title="Confirm your subscription" lead={`Hello ${v.name}: one step left to receive progress e-mails about ${v.project.name} at ${v.email}.`}>
      <div className="flex flex-col gap-4">
        <ConsentNote consent={v.consent} />
        {confirm.isError ? <LinkProblem error={confirm.error} /> : null}
        <Button variant="primary" busy={confirm.isPending} onClick={() => confirm.mutate()}>
          Confirm subscription
        </Button>
        <p className="text-sm text-ink-soft">Not you? Close this page: nothing is sent, and the address is forgotten after 30 days.</p>
      </div>
    </PublicSheet>
  );
}

type PrefValues = z.input<typeof PreferencesInputSchema>;
const frequencyOptions = FrequencySchema.options.map((v) => ({ value: v, label: FREQUENCY_WORD[v] }));

function PreferencesForm({ token, view }: { token: string; view: PreferencesView }) {
  const update = useUpdatePreferences(token);
  const leave = useLeaveFromPreferences(token);
  const form = useForm<PrefValues>({
    resolver: zodResolver(PreferencesInputSchema),
    defaultValues: { name: view.name, organisation: view.organisation ?? "", frequency: view.frequency, topics: view.topics },
  });
  const onSubmit = submitting(form, async (v) => {
    await update.mutateAsync(v);
    toast.success("Preferences saved");
  }, "frequency");
  const errors = form.formState.errors;
  return (
    <div className="flex flex-col gap-6">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <TextField label="Your name" autoComplete="name" error={errors.name?.message} {...form.register("name")} />
        <TextField label="Organisation (optional)" autoComplete="organization" error={errors.organisation?.message} {...form.register("organisation")} />
        <SelectField label="How often" options={frequencyOptions} error={errors.frequency?.message} {...form.register("frequency")} />
        <Controller
          control={form.control}
          name="topics"
          render={({ field, fieldState }) => <TopicsPicker value={field.value ?? null} onChange={field.onChange} areas={view.options.areas} systems={view.options.systems} error={fieldState.error?.message} />}
        />
        <Button type="submit" variant="primary" busy={update.isPending}>
          Save preferences
        </Button>
      </form>
      <div className="border-t border-rule pt-4">
        <h2 className="font-semibold">Leave</h2>
        <p className="mt-1 text-sm text-ink-soft">Stop every e-mail about {view.project.name} to {view.email}.</p>
        <Button className="mt-3" variant="danger" busy={leave.isPending} onClick={() => leave.mutate()}>
          Unsubscribe
        </Button>
      </div>
    </div>
  );
}

/** /subscriptions/preferences/:token — no sign-in: the signed link is the key. */
export function PreferencesPage() {
  const { token, view: v } = useLinkView(preferencesQueryOptions);
  const look = STATUS_LOOK[v.status];
  return (
    <PublicSheet label={v.project.name} title="Your preferences" lead={`${v.email} · ${INTEREST_SHORT[v.interest]}`}>
      <p className={`mb-4 inline-flex items-center gap-1 text-sm font-medium ${look.className}`}>
        <span aria-hidden>{look.glyph}</span> {look.word}
      </p>
      {v.status === "confirmed" ? (
        <PreferencesForm key={`${v.frequency}-${JSON.stringify(v.topics)}`} token={token} view={v} />
      ) : (
        <Notice title="You are not subscribed">
          No e-mail about {v.project.name} goes to this address.{" "}
          <Link to={`/projects/${v.project.slug}/subscribe`} className="underline underline-offset-4">
            Subscribe again
          </Link>
        </Notice>
      )}
      <section aria-labelledby="past-digests" className="mt-8 border-t border-rule pt-6">
        <h2 id="past-digests" className="mb-3 text-lg font-semibold">
          Your past digests
        </h2>
        <DigestArchive
          listOptions={(page) => pastDigestsQueryOptions(token, page)}
          copyOptions={(id) => pastDigestQueryOptions(token, id)}
          emptyText={`No digest about ${v.project.name} has been sent to this address yet.`}
        />
      </section>
    </PublicSheet>
  );
}

/** /u/:token — what a person sees opening the one-click link; the mail client's POST needs no page. */
export function OneClickUnsubscribePage() {
  const { token, view: v } = useLinkView(unsubscribeQueryOptions);
  const leave = useUnsubscribe(token);
  const gone = leave.isSuccess || v.status === "unsubscribed";
  return (
    <PublicSheet label={v.project.name} title={gone ? "You are unsubscribed" : "Unsubscribe"}>
      {gone ? (
        <Notice title="Done">
          No more e-mail about {v.project.name} will be sent to {v.email}.{" "}
          <Link to={`/projects/${v.project.slug}/subscribe`} className="underline underline-offset-4">
            Subscribe again
          </Link>
        </Notice>
      ) : (
        <div className="flex flex-col gap-4">
          <p>
            Stop progress e-mails about {v.project.name} to <span className="font-medium">{v.email}</span>?
          </p>
          <Button variant="primary" busy={leave.isPending} onClick={() => leave.mutate()}>
            Unsubscribe
          </Button>
        </div>
      )}
    </PublicSheet>
  );
}

type DigestValues = z.input<typeof InvestorDigestInputSchema>;

function InvestorDigestForm({ setting }: { setting: InvestorDigestSetting }) {
  const save = useSetInvestorDigest();
  const form = useForm<DigestValues>({
    resolver: zodResolver(InvestorDigestInputSchema),
    defaultValues: { enabled: setting.enabled, frequency: setting.frequency, topics: setting.topics },
  });
  const onSubmit = submitting(form, async (v) => {
    await save.mutateAsync({ slug: setting.project.slug, ...v });
    toast.success(v.enabled ? "Digest saved" : "Digest turned off");
  }, "frequency");
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <label className="flex items-center gap-2 text-sm font-medium">
        <input type="checkbox" className="size-4" {...form.register("enabled")} />
        Send me the investor digest of {setting.project.name}
      </label>
      <SelectField label="How often" options={frequencyOptions} error={form.formState.errors.frequency?.message} {...form.register("frequency")} />
      <Controller
        control={form.control}
        name="topics"
        render={({ field, fieldState }) => <TopicsPicker value={field.value ?? null} onChange={field.onChange} areas={setting.options.areas} systems={setting.options.systems} error={fieldState.error?.message} />}
      />
      <ConsentNote consent={INVESTOR_CONSENT} />
      <div>
        <Button type="submit" variant="primary" busy={save.isPending}>
          Save digest
        </Button>
      </div>
    </form>
  );
}

/** Digest settings belong to investor accounts: staff are told so, and nothing is asked for them. */
const isInvestor = (me: { role: string } | null | undefined) => me?.role === "investor";

export const investorDigestLoader: RouteLoader = (qc) => () =>
  primeWhenAllowed(qc, INVESTOR_ROLES, async () => {
    if (isInvestor(await qc.ensureQueryData(meQueryOptions()))) await Promise.all([qc.ensureQueryData(investorDigestQueryOptions()), qc.ensureQueryData(myDigestsQueryOptions(1))]);
  });

function InvestorDigestSettings() {
  const settings = useSuspenseQuery(investorDigestQueryOptions()).data;
  return (
    <div className="flex flex-col gap-6">
      {settings.map((s) => (
        <Sheet key={s.project.slug} label={s.status ? STATUS_LOOK[s.status].word : "Not receiving"} title={s.project.name}>
          <InvestorDigestForm key={`${s.status}-${s.frequency}-${JSON.stringify(s.topics)}`} setting={s} />
        </Sheet>
      ))}
    </div>
  );
}

/** /investors/digest — an investor account's own digest, with the investor audience. */
export function InvestorDigestPage() {
  const me = useSuspenseQuery(meQueryOptions()).data;
  return (
    <>
      <PageHeader sheet="Investor room · Digest" title="Your digest" description="A digest by e-mail of what changed on each build, including investor-only updates and programme detail." />
      {isInvestor(me) ? (
        <>
          <InvestorDigestSettings />
          <Sheet label="Sent to you" title="My digests">
            <DigestArchive listOptions={myDigestsQueryOptions} copyOptions={myDigestQueryOptions} emptyText="No digest has been sent to you yet." />
          </Sheet>
        </>
      ) : (
        <Notice title="For investor accounts">Digest settings belong to investor accounts. Staff see every digest in the site office.</Notice>
      )}
    </>
  );
}

const any = (label: string) => ({ value: "", label });

/** The office list's filters, on the chosen build (the first one unless chosen). */
function subscriberQuery(filters: SubscriberFilterQuery, firstSlug: string): SubscriberFilterQuery {
  const projectSlug = filters.projectSlug ?? firstSlug;
  return { ...filters, projectSlug: projectSlug || undefined };
}

export const subscribersLoader: RouteLoader = (qc) => ({ request }) =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const first = (await qc.ensureQueryData(subscriptionProjectsQueryOptions()))[0]?.slug ?? "";
    const page = pageFromParams(new URL(request.url).searchParams);
    await Promise.all([qc.ensureQueryData(subscribersQueryOptions({ ...subscriberQuery({}, first), page })), first ? qc.ensureQueryData(subscriptionOptionsQueryOptions(first)) : null]);
  });

/** The topics a filter can name: the build's areas and the plant systems. */
function useTopicOptions(projectSlug: string) {
  const options = useSuspenseQuery(subscriptionOptionsQueryOptions(projectSlug)).data;
  return [any("Any topic"), ...options.areas.map((a) => ({ value: `area:${a}`, label: a })), ...options.systems.map((s) => ({ value: `system:${s}`, label: SYSTEM_WORD[s] }))];
}

function TopicFilter({ projectSlug, value, onChange }: { projectSlug: string; value: string; onChange: (topic: SubscriberFilterQuery["topic"]) => void }) {
  const options = useTopicOptions(projectSlug);
  return <SelectField label="Topic" value={value} onChange={(e) => onChange((e.target.value || undefined) as SubscriberFilterQuery["topic"])} options={options} hint="Who would receive it: its followers and those following everything." />;
}

/** /office/subscribers — marketing's list: filters, the table, import and export. */
export function SubscribersPage() {
  const projects = useSuspenseQuery(subscriptionProjectsQueryOptions()).data;
  const [filters, setFilters] = useState<SubscriberFilterQuery>({});
  const [params, setParams] = useSearchParams();
  const page = pageFromParams(params);
  const first = projects[0]?.slug ?? "";
  const query = subscriberQuery(filters, first);
  const projectSlug = query.projectSlug ?? "";
  // While the next filters' rows are asked for, the table keeps showing the last ones (and the fields keep their focus).
  const shownFilters = useDeferredValue(filters);
  const shownQuery = subscriberQuery(shownFilters, first);
  const shownPage = useDeferredValue(page);
  const list = useSuspenseQuery(subscribersQueryOptions({ ...shownQuery, page: shownPage })).data;
  // New filters start again from the first page.
  const set = (patch: Partial<SubscriberFilterQuery>) => {
    setFilters((f) => ({ ...f, ...patch }));
    if (page > 1)
      setParams(
        (p) => {
          p.delete("page");
          return p;
        },
        { replace: true },
      );
  };
  const project = projects.find((p) => p.slug === projectSlug);
  return (
    <>
      <PageHeader
        sheet="Site office · Subscribers"
        title="Subscribers"
        description="Who receives progress e-mails, on what consent. Unconfirmed addresses receive nothing but their confirmation and are forgotten after 30 days."
        actions={
          <a className={buttonClass()} href={subscribersCsvUrl(query)} download>
            Export CSV
          </a>
        }
      />
      <div className="flex flex-col gap-6">
        <Sheet label="Filter" title="Find subscribers">
          <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
            {projects.length > 1 ? (
              <SelectField label="Build" value={projectSlug} onChange={(e) => set({ projectSlug: e.target.value, topic: undefined })} options={projects.map((p) => ({ value: p.slug, label: p.name }))} />
            ) : null}
            <SelectField label="Interest" value={filters.interest ?? ""} onChange={(e) => set({ interest: (e.target.value || undefined) as SubscriberFilterQuery["interest"] })} options={[any("Any interest"), ...InterestSchema.options.map((v) => ({ value: v, label: INTEREST_SHORT[v] }))]} />
            <SelectField label="Status" value={filters.status ?? ""} onChange={(e) => set({ status: (e.target.value || undefined) as SubscriberFilterQuery["status"] })} options={[any("Any status"), ...SubscriberStatusSchema.options.map((v) => ({ value: v, label: STATUS_LOOK[v].word }))]} />
            <SelectField label="How often" value={filters.frequency ?? ""} onChange={(e) => set({ frequency: (e.target.value || undefined) as SubscriberFilterQuery["frequency"] })} options={[any("Any frequency"), ...FrequencySchema.options.map((v) => ({ value: v, label: FREQUENCY_SHORT[v] }))]} />
            {shownQuery.projectSlug ? (
              <TopicFilter projectSlug={shownQuery.projectSlug} value={filters.topic ?? ""} onChange={(topic) => set({ topic })} />
            ) : (
              <SelectField label="Topic" value="" onChange={() => undefined} options={[any("Any topic")]} hint="Who would receive it: its followers and those following everything." />
            )}
            <TextField label="Name, e-mail or organisation" type="search" value={filters.q ?? ""} onChange={(e) => set({ q: e.target.value || undefined })} />
          </div>
        </Sheet>
        <section aria-labelledby="subs-h">
          <h2 id="subs-h" className="mb-2 text-lg font-semibold">
            {`${list.total} ${list.total === 1 ? "subscriber" : "subscribers"}`}
          </h2>
          <SubscribersTable rows={list.rows} />
          <UrlPager total={list.total} pageSize={list.pageSize} label="Pages of subscribers" previous="← Newer" next="Older →" />
        </section>
        {project ? (
          <Sheet label="Import" title="Import from a CSV file">
            <ImportPanel projectSlug={project.slug} projectName={project.name} />
          </Sheet>
        ) : null}
      </div>
    </>
  );
}
