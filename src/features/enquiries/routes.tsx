import { zodResolver } from "@hookform/resolvers/zod";
import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { createColumnHelper } from "@tanstack/react-table";
import { useMemo } from "react";
import { useForm } from "react-hook-form";
import { Link, useParams, useRouteError, useSearchParams } from "react-router-dom";
import { toast } from "sonner";
import { z } from "zod";
import { EnquiryPatchSchema, EnquiryStatusSchema, type EnquiryPatch, type EnquiryRow, type EnquiryStatus } from "#shared/schemas/enquiries.ts";
import { Button } from "../../components/ui/button.tsx";
import { DataTable, useSortedTable } from "../../components/ui/data-table.tsx";
import { SelectField, TextAreaField } from "../../components/ui/field.tsx";
import { Notice, PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { applyFieldErrors, formatDate, formatInstant } from "../../lib/format.ts";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";
import { enquiriesQueryOptions, enquiryFacilityQueryOptions, enquiryOwnersQueryOptions, enquiryProjectQueryOptions, enquiryQueryOptions, useUpdateEnquiry } from "./api.ts";
import { EnquiryForm, type EnquiryAbout } from "./components/enquiry-form.tsx";
import { ENQUIRY_STATUS_LOOK, enquirySummary, KIND_WORD } from "./words.ts";

/** `?block=ID`: the capacity block an enquiry from its card is about. */
const blockParam = (params: URLSearchParams) => Number(params.get("block")) || 0;

/** Primes the project the enquiry is about, and the facility when it comes from a block's card. */
export const enquireLoader: RouteLoader = (qc) => async ({ params, request }) => {
  const slug = params.slug ?? "";
  const block = blockParam(new URL(request.url).searchParams);
  // A block that cannot be read (hidden, gone) only leaves the form blank: no error page for it.
  await Promise.all([qc.ensureQueryData(enquiryProjectQueryOptions(slug)), block ? qc.ensureQueryData(enquiryFacilityQueryOptions(slug)).catch(() => null) : null]);
  return null;
};

/** The block an enquiry is about, from `?block=ID`, when the caller may see it. */
function useBlockAbout(slug: string): EnquiryAbout | undefined {
  const [params] = useSearchParams();
  const id = blockParam(params);
  const facility = useQuery({ ...enquiryFacilityQueryOptions(slug), enabled: id > 0, retry: false });
  const b = facility.data?.blocks.find((x) => x.id === id);
  return b ? { name: b.name, racks: b.racks, kwPerRack: b.maxKwPerRack } : undefined;
}

/** The enquiry route's error element: the project the address names is not there. */
export function EnquireError() {
  const error = useRouteError();
  return (
    <div className="mx-auto max-w-3xl px-4 py-10">
      <Notice tone="error" title="Project not found">
        {error instanceof Error ? error.message : "This project cannot be opened."}
      </Notice>
    </div>
  );
}

/** /projects/:slug/enquire — ask about capacity, ask for a visit, or ask a question. */
export function EnquirePage() {
  const { slug = "" } = useParams();
  const p = useSuspenseQuery(enquiryProjectQueryOptions(slug)).data;
  useTitle("Make an enquiry", p.name);
  const about = useBlockAbout(slug);
  return (
    <div className="mx-auto w-full max-w-3xl px-4 py-8 sm:py-12">
      <p className="label-caps">
        {p.operatorName} · {p.name}
      </p>
      <h1 className="mt-1 text-2xl font-semibold tracking-tight sm:text-3xl">Make an enquiry</h1>
      <p className="mt-2 text-ink-soft">
        The operator's team answers by e-mail, usually within two working days.{" "}
        <Link to={`/projects/${p.slug}`} className="underline underline-offset-4">
          Back to the build
        </Link>
      </p>
      <div className="mt-6 border border-rule bg-sheet p-4 sm:p-6">
        <EnquiryForm key={about?.name ?? ""} project={p} about={about} />
      </div>
    </div>
  );
}

function StatusMark({ status }: { status: EnquiryStatus }) {
  const look = ENQUIRY_STATUS_LOOK[status];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap font-medium ${look.className}`}>
      <span aria-hidden>{look.glyph}</span> {look.word}
    </span>
  );
}

/** The team's fields of an enquiry, checked by the schema the server parses (`ownerId` is a select's text here). */
const DetailFormSchema = z.strictObject({ status: EnquiryStatusSchema, ownerId: z.string(), notes: EnquiryPatchSchema.shape.notes.unwrap() });
type DetailValues = z.infer<typeof DetailFormSchema>;

const detailValuesOf = (e: EnquiryRow): DetailValues => ({ status: e.status, ownerId: e.owner ? String(e.owner.id) : "", notes: e.notes });

function Detail({ id, onClose }: { id: number; onClose: () => void }) {
  const e = useSuspenseQuery(enquiryQueryOptions(id)).data;
  const owners = useSuspenseQuery(enquiryOwnersQueryOptions()).data;
  const update = useUpdateEnquiry();
  // A fresh copy from the server (after saving) becomes the form's values.
  const form = useForm<DetailValues>({ resolver: zodResolver(DetailFormSchema), values: detailValuesOf(e) });
  const onSubmit = form.handleSubmit((v) => {
    const patch: EnquiryPatch = { status: v.status, ownerId: v.ownerId ? Number(v.ownerId) : null, notes: v.notes };
    update.mutate(
      { id: e.id, ...patch },
      {
        onSuccess: () => toast.success("Enquiry saved"),
        onError: (err) => {
          if (err instanceof ApiError && Object.keys(err.fields).length) applyFieldErrors(err.fields, form.setError);
        },
      },
    );
  });
  const facts: Array<[string, string]> = [
    ["Project", e.project.name],
    ["From", `${e.name}${e.organisation ? `, ${e.organisation}` : ""}`],
    ["E-mail", e.email],
    ["Telephone", e.phone ?? "—"],
    ["Received", formatInstant(e.createdAt)],
  ];
  if (e.kind === "capacity") facts.push(["Racks", String(e.racks)], ["kW per rack", String(e.kwPerRack)], ["Needed by", e.neededBy ? formatDate(e.neededBy) : "—"]);
  if (e.kind === "visit") facts.push(["People", String(e.partySize)], ["Preferred dates", e.preferredDates.map((d) => formatDate(d)).join(", ")], ["Site rules", "Shown and accepted"]);
  const errors = form.formState.errors;
  return (
    <Sheet
      label={`${KIND_WORD[e.kind]} enquiry`}
      title={e.name}
      actions={
        <Button size="sm" variant="ghost" onClick={onClose}>
          Close
        </Button>
      }
    >
      <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[10rem_1fr]">
        {facts.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-faint">{k}</dt>
            <dd className="break-words">{v}</dd>
          </div>
        ))}
      </dl>
      {e.message ? <p className="mt-3 whitespace-pre-wrap border-l-2 border-rule pl-3 font-serif">{e.message}</p> : null}
      <form className="mt-4 grid gap-3 sm:grid-cols-2" noValidate onSubmit={onSubmit}>
        <SelectField label="Status" error={errors.status?.message} options={EnquiryStatusSchema.options.map((s) => ({ value: s, label: ENQUIRY_STATUS_LOOK[s].word }))} {...form.register("status")} />
        <SelectField label="Owner" error={errors.ownerId?.message} options={[{ value: "", label: "Nobody yet" }, ...owners.map((o) => ({ value: String(o.id), label: o.name }))]} {...form.register("ownerId")} />
        <div className="sm:col-span-2">
          <TextAreaField label="Notes" rows={4} error={errors.notes?.message} hint="For the team only; the enquirer never sees them." {...form.register("notes")} />
        </div>
        <div>
          <Button type="submit" variant="primary" busy={update.isPending}>
            Save
          </Button>
        </div>
      </form>
    </Sheet>
  );
}

const col = createColumnHelper<EnquiryRow>();

/** The list's status filter, and the enquiry opened beside it, as the address carries them. */
function viewOf(params: URLSearchParams): { status: EnquiryStatus | ""; open: number | null } {
  return { status: (params.get("status") ?? "") as EnquiryStatus | "", open: params.get("open") ? Number(params.get("open")) : null };
}

export const enquiriesLoader: RouteLoader = (qc) => ({ request }) =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const { status, open } = viewOf(new URL(request.url).searchParams);
    await Promise.all([
      qc.ensureQueryData(enquiriesQueryOptions({ status: status || undefined })),
      open !== null ? Promise.all([qc.ensureQueryData(enquiryQueryOptions(open)), qc.ensureQueryData(enquiryOwnersQueryOptions())]) : null,
    ]);
  });

/** /office/enquiries — marketing's list, with status, owner and notes. */
export function EnquiriesPage() {
  const [params, setParams] = useSearchParams();
  const { status, open } = viewOf(params);
  const list = useSuspenseQuery(enquiriesQueryOptions({ status: status || undefined })).data;
  const setParam = (k: string, v: string | null) => {
    const next = new URLSearchParams(params);
    if (v) next.set(k, v);
    else next.delete(k);
    setParams(next);
  };
  const columns = useMemo(
    () => [
      col.accessor("createdAt", { header: "Received", cell: (c) => <span className="whitespace-nowrap">{formatInstant(c.getValue())}</span> }),
      col.accessor("kind", { header: "About", meta: { key: true }, cell: (c) => KIND_WORD[c.getValue()] }),
      col.accessor("name", {
        header: "From",
        meta: { key: true },
        cell: (c) => (
          <div className="min-w-40">
            <p className="font-medium">{c.getValue()}</p>
            <p className="text-ink-soft">{c.row.original.organisation ?? c.row.original.email}</p>
          </div>
        ),
      }),
      col.accessor((r) => enquirySummary(r), { id: "summary", header: "Summary" }),
      col.accessor("status", { header: "Status", cell: (c) => <StatusMark status={c.getValue()} /> }),
      col.accessor((r) => r.owner?.name ?? "", { id: "owner", header: "Owner", cell: (c) => c.getValue() || "—" }),
      col.display({
        id: "open",
        header: "",
        meta: { actions: true },
        cell: (c) => (
          <Button size="sm" aria-label={`Open the enquiry from ${c.row.original.name}`} onClick={() => setParam("open", String(c.row.original.id))}>
            Open
          </Button>
        ),
      }),
    ],
    [params],
  );
  const table = useSortedTable({ data: list, columns });
  return (
    <>
      <PageHeader sheet="Site office · Enquiries" title="Enquiries" description="Capacity questions, visit requests and general questions from the public pages. Each new one is e-mailed to marketing." />
      <div className="flex flex-col gap-6">
        <div className="max-w-xs">
          <SelectField label="Status" value={status} onChange={(e) => setParam("status", e.target.value || null)} options={[{ value: "", label: "Every status" }, ...EnquiryStatusSchema.options.map((s) => ({ value: s, label: ENQUIRY_STATUS_LOOK[s].word }))]} />
        </div>
        {open !== null ? <Detail key={open} id={open} onClose={() => setParam("open", null)} /> : null}
        <DataTable table={table} caption="Enquiries, newest first" empty="No enquiries with this status." />
      </div>
    </>
  );
}
