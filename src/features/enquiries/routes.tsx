import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { useEffect, useMemo, useState } from "react";
import { Link, useParams, useSearchParams } from "react-router-dom";
import { toast } from "sonner";
import { EnquiryStatusSchema, type EnquiryRow, type EnquiryStatus } from "#shared/schemas/enquiries.ts";
import { Button } from "../../components/ui/button.tsx";
import { DataTable } from "../../components/ui/data-table.tsx";
import { SelectField, TextAreaField } from "../../components/ui/field.tsx";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { formatDate, formatInstant } from "../../lib/format.ts";
import { useEnquiries, useEnquiry, useEnquiryOwners, useEnquiryProject, useUpdateEnquiry } from "./api.ts";
import { EnquiryForm } from "./components/enquiry-form.tsx";
import { ENQUIRY_STATUS_LOOK, enquirySummary, KIND_WORD } from "./words.ts";

/** /projects/:slug/enquire — ask about capacity, ask for a visit, or ask a question. */
export function EnquirePage() {
  const { slug = "" } = useParams();
  const project = useEnquiryProject(slug);
  if (project.isPending) return <Spinner />;
  if (project.isError) {
    return (
      <div className="mx-auto max-w-3xl px-4 py-10">
        <Notice tone="error" title="Project not found">
          {project.error.message}
        </Notice>
      </div>
    );
  }
  const p = project.data;
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
        <EnquiryForm project={p} />
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

function Detail({ id, onClose }: { id: number; onClose: () => void }) {
  const enquiry = useEnquiry(id);
  const owners = useEnquiryOwners();
  const update = useUpdateEnquiry();
  const [status, setStatus] = useState<EnquiryStatus>("new");
  const [ownerId, setOwnerId] = useState<string>("");
  const [notes, setNotes] = useState("");
  useEffect(() => {
    if (!enquiry.data) return;
    setStatus(enquiry.data.status);
    setOwnerId(enquiry.data.owner ? String(enquiry.data.owner.id) : "");
    setNotes(enquiry.data.notes);
  }, [enquiry.data]);
  if (enquiry.isPending) return <Spinner />;
  if (enquiry.isError) return <Notice tone="error">{enquiry.error.message}</Notice>;
  const e = enquiry.data;
  const facts: Array<[string, string]> = [
    ["Project", e.project.name],
    ["From", `${e.name}${e.organisation ? `, ${e.organisation}` : ""}`],
    ["E-mail", e.email],
    ["Telephone", e.phone ?? "—"],
    ["Received", formatInstant(e.createdAt)],
  ];
  if (e.kind === "capacity") facts.push(["Racks", String(e.racks)], ["kW per rack", String(e.kwPerRack)], ["Needed by", e.neededBy ? formatDate(e.neededBy) : "—"]);
  if (e.kind === "visit") facts.push(["People", String(e.partySize)], ["Preferred dates", e.preferredDates.map((d) => formatDate(d)).join(", ")], ["Site rules", "Shown and accepted"]);
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
      <form
        className="mt-4 grid gap-3 sm:grid-cols-2"
        onSubmit={(ev) => {
          ev.preventDefault();
          update.mutate({ id: e.id, status, ownerId: ownerId ? Number(ownerId) : null, notes }, { onSuccess: () => toast.success("Enquiry saved") });
        }}
      >
        <SelectField label="Status" value={status} onChange={(ev) => setStatus(ev.target.value as EnquiryStatus)} options={EnquiryStatusSchema.options.map((s) => ({ value: s, label: ENQUIRY_STATUS_LOOK[s].word }))} />
        <SelectField label="Owner" value={ownerId} onChange={(ev) => setOwnerId(ev.target.value)} options={[{ value: "", label: "Nobody yet" }, ...(owners.data ?? []).map((o) => ({ value: String(o.id), label: o.name }))]} />
        <div className="sm:col-span-2">
          <TextAreaField label="Notes" rows={4} value={notes} onChange={(ev) => setNotes(ev.target.value)} hint="For the team only; the enquirer never sees them." />
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

/** /office/enquiries — marketing's list, with status, owner and notes. */
export function EnquiriesPage() {
  const [params, setParams] = useSearchParams();
  const status = (params.get("status") ?? "") as EnquiryStatus | "";
  const open = params.get("open") ? Number(params.get("open")) : null;
  const list = useEnquiries({ status: status || undefined });
  const [sorting, setSorting] = useState<SortingState>([]);
  const setParam = (k: string, v: string | null) => {
    const next = new URLSearchParams(params);
    if (v) next.set(k, v);
    else next.delete(k);
    setParams(next);
  };
  const columns = useMemo(
    () => [
      col.accessor("createdAt", { header: "Received", cell: (c) => <span className="whitespace-nowrap">{formatInstant(c.getValue())}</span> }),
      col.accessor("kind", { header: "About", cell: (c) => KIND_WORD[c.getValue()] }),
      col.accessor("name", {
        header: "From",
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
        cell: (c) => (
          <Button size="sm" aria-label={`Open the enquiry from ${c.row.original.name}`} onClick={() => setParam("open", String(c.row.original.id))}>
            Open
          </Button>
        ),
      }),
    ],
    [params],
  );
  const table = useReactTable({ data: list.data ?? [], columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <>
      <PageHeader sheet="Site office · Enquiries" title="Enquiries" description="Capacity questions, visit requests and general questions from the public pages. Each new one is e-mailed to marketing." />
      <div className="flex flex-col gap-6">
        <div className="max-w-xs">
          <SelectField label="Status" value={status} onChange={(e) => setParam("status", e.target.value || null)} options={[{ value: "", label: "Every status" }, ...EnquiryStatusSchema.options.map((s) => ({ value: s, label: ENQUIRY_STATUS_LOOK[s].word }))]} />
        </div>
        {open !== null ? <Detail key={open} id={open} onClose={() => setParam("open", null)} /> : null}
        {list.isPending ? <Spinner /> : list.isError ? <Notice tone="error">{list.error.message}</Notice> : <DataTable table={table} caption="Enquiries, newest first" empty="No enquiries with this status." />}
      </div>
    </>
  );
}
