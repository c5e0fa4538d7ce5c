import { useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import { createColumnHelper } from "@tanstack/react-table";
import { useState } from "react";
import { Link, useParams, useSearchParams } from "react-router-dom";
import { OUTBOX_PAGE_SIZE, type OutboxMessage } from "#shared/schemas/outbox.ts";
import { DataTable, useSortedTable } from "../../components/ui/data-table.tsx";
import { Button } from "../../components/ui/button.tsx";
import { TextField } from "../../components/ui/field.tsx";
import { pageFromParams, UrlPager } from "../../components/ui/pager.tsx";
import { Notice, PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { formatInstant } from "../../lib/format.ts";
import { primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { meQueryOptions } from "../../lib/session.ts";
import { outboxListQueryOptions, outboxMessageQueryOptions } from "./api.ts";
import { onSubmitted } from "../../lib/forms.ts";

/**
 * The outbox holds other people's sign-in links (resets, invitations), so only administrators
 * open it; the server refuses everyone else too, and this says so plainly.
 */
function OutboxRefusal() {
  return (
    <div data-testid="refusal">
      <PageHeader sheet="Site office · Outbox" title="Not open to your account" />
      <Notice tone="error" title="Administrators only">
        The outbox keeps copies of the e-mails Plumbline sent, including other people&rsquo;s password-reset and invitation links, so only administrators may read it.
      </Notice>
    </div>
  );
}

const refused = (e: unknown) => e instanceof ApiError && (e.status === 403 || e.status === 401);

const toFilter = (params: URLSearchParams) => ({ to: params.get("to") || undefined, page: pageFromParams(params) });

/** Only an administrator's page asks for messages; anyone else is refused without a request. */
const ADMIN = ["admin"] as const;

/**
 * Asks for the messages. When the server refuses them (an administrator whose session ended or
 * whose role changed meanwhile), the refusal stays in the cache and the page shows it.
 */
async function primeUnlessRefused(prime: () => Promise<unknown>): Promise<void> {
  try {
    await prime();
  } catch (e) {
    if (!refused(e)) throw e;
  }
}

export const outboxLoader: RouteLoader = (qc) => ({ request }) =>
  primeWhenAllowed(qc, ADMIN, () => primeUnlessRefused(() => qc.ensureQueryData(outboxListQueryOptions(toFilter(new URL(request.url).searchParams)))));

export const outboxMessageLoader: RouteLoader = (qc) => ({ params }) => primeWhenAllowed(qc, ADMIN, () => primeUnlessRefused(() => qc.ensureQueryData(outboxMessageQueryOptions(Number(params.id)))));

/** Whether the signed-in user is an administrator (the area's loader primed who it is). */
function useIsAdmin(): boolean {
  return useSuspenseQuery(meQueryOptions()).data?.role === "admin";
}

/** Whether the server refused this query when the loader asked (nothing to suspend on then). */
function useRefusedByServer(queryKey: readonly unknown[]): boolean {
  return refused(useQueryClient().getQueryState(queryKey)?.error);
}

const col = createColumnHelper<OutboxMessage>();
const columns = [
  col.accessor("receivedAt", { header: "Received", meta: { key: true }, cell: (c) => <span className="whitespace-nowrap">{formatInstant(c.getValue())}</span> }),
  col.accessor("subject", {
    header: "Subject",
    meta: { key: true },
    cell: (c) => (
      <Link to={`/office/outbox/${c.row.original.id}`} className="font-medium underline underline-offset-4">
        {c.getValue() || "(no subject)"}
      </Link>
    ),
  }),
  col.accessor("to", { header: "To", cell: (c) => <span className="break-all">{c.getValue()}</span> }),
  col.accessor("from", { header: "From", cell: (c) => <span className="break-all text-ink-soft">{c.getValue()}</span> }),
];

function OutboxTable({ rows }: { rows: OutboxMessage[] }) {
  const table = useSortedTable({ data: rows, columns });
  return <DataTable table={table} caption="Messages, newest first" />;
}

export function OutboxPage() {
  const [params] = useSearchParams();
  const filter = toFilter(params);
  const isAdmin = useIsAdmin();
  const refusedByServer = useRefusedByServer(outboxListQueryOptions(filter).queryKey);
  if (!isAdmin || refusedByServer) return <OutboxRefusal />;
  return <OutboxList to={filter.to ?? ""} page={filter.page} />;
}

function OutboxList({ to, page }: { to: string; page: number }) {
  const [, setParams] = useSearchParams();
  const [draft, setDraft] = useState(to);
  const list = useSuspenseQuery(outboxListQueryOptions({ to: to || undefined, page }));
  if (list.isError && refused(list.error)) return <OutboxRefusal />;
  return (
    <>
      <PageHeader
        sheet="Site office · Outbox"
        title="Outbox"
        description="Every e-mail Plumbline sent in this demo: invitations, resets, digests. None of it was delivered outside this demo. Single-use and signed links are shown masked; they work only from the recipient's own copy."
        actions={
          <Button size="sm" onClick={() => void list.refetch()} busy={list.isFetching}>
            Refresh
          </Button>
        }
      />
      <form
        className="mb-4 flex flex-wrap items-end gap-2"
        onSubmit={onSubmitted(() => setParams(draft ? { to: draft } : {}))}
      >
        <div className="min-w-60 flex-1">
          <TextField label="Recipient" type="email" placeholder="name@example.com" value={draft} onChange={(e) => setDraft(e.target.value)} />
        </div>
        <Button type="submit">Filter</Button>
      </form>
      {list.data.items.length === 0 && list.data.total === 0 ? <Notice>No messages{to ? ` to ${to}` : ""} yet.</Notice> : <OutboxTable rows={list.data.items} />}
      <UrlPager total={list.data.total} pageSize={OUTBOX_PAGE_SIZE} label="Pages of the outbox" previous="← Newer" next="Older →" />
    </>
  );
}

type View = "html" | "text" | "headers";

export function OutboxMessagePage() {
  const id = Number(useParams().id);
  const isAdmin = useIsAdmin();
  const refusedByServer = useRefusedByServer(outboxMessageQueryOptions(id).queryKey);
  if (!isAdmin || refusedByServer) return <OutboxRefusal />;
  return <OutboxMessageView id={id} />;
}

function OutboxMessageView({ id }: { id: number }) {
  const m = useSuspenseQuery(outboxMessageQueryOptions(id)).data;
  const [view, setView] = useState<View>("html");
  return (
    <>
      <PageHeader sheet={`Site office · Outbox · message ${m.id}`} title={m.subject || "(no subject)"} description={`From ${m.from} to ${m.to} · ${formatInstant(m.receivedAt)}`} />
      <p className="mb-4 text-sm">
        <Link to="/office/outbox" className="text-ink underline underline-offset-4">
          ← All messages
        </Link>
      </p>
      <div className="flex flex-wrap items-end gap-2">
        <div role="tablist" aria-label="Message views" className="mb-0 flex flex-wrap gap-1">
          {(["html", "text", "headers"] as View[]).map((v) => (
            <button
              key={v}
              role="tab"
              type="button"
              aria-selected={view === v}
              onClick={() => setView(v)}
              className={`border border-b-0 px-3 py-1.5 text-sm ${view === v ? "border-ink bg-sheet font-semibold" : "border-rule bg-paper text-ink-soft"}`}
            >
              {v === "html" ? "As HTML" : v === "text" ? "Plain text" : "Headers"}
            </button>
          ))}
        </div>
        {/* Beside the tabs, not inside their list: a tablist holds only tabs. */}
        <a className="ml-auto self-center text-sm text-ink underline underline-offset-4" href={`/api/outbox/${m.id}/raw`}>
          Raw source (.eml)
        </a>
      </div>
      <Sheet className="border-ink">
        {view === "html" ? (
          m.html ? (
            <iframe title="Message as HTML" sandbox="" srcDoc={m.html} className="h-[32rem] w-full bg-white" />
          ) : (
            <p>This message has no HTML part.</p>
          )
        ) : view === "text" ? (
          <pre className="whitespace-pre-wrap break-words font-mono text-sm">{m.text}</pre>
        ) : (
          <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[12rem_1fr]">
            {Object.entries(m.headers).map(([k, v]) => (
              <div key={k} className="contents">
                <dt className="font-mono font-semibold">{k}</dt>
                <dd className="break-all font-mono">{v}</dd>
              </div>
            ))}
          </dl>
        )}
      </Sheet>
    </>
  );
}
