import { useState } from "react";
import { Link, useParams, useSearchParams } from "react-router-dom";
import { Button } from "../../components/ui/button.tsx";
import { TextField } from "../../components/ui/field.tsx";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { formatInstant } from "../../lib/format.ts";
import { useOutbox, useOutboxMessage } from "./api.ts";

export function OutboxPage() {
  const [params, setParams] = useSearchParams();
  const to = params.get("to") ?? "";
  const [draft, setDraft] = useState(to);
  const list = useOutbox({ to: to || undefined });
  return (
    <>
      <PageHeader
        sheet="Site office · Outbox"
        title="Outbox"
        description="Every e-mail Plumbline sent while mail goes to the local sink: invitations, resets, and later digests. Nothing here left the machine."
        actions={
          <Button size="sm" onClick={() => void list.refetch()} busy={list.isFetching}>
            Refresh
          </Button>
        }
      />
      <form
        className="mb-4 flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          setParams(draft ? { to: draft } : {});
        }}
      >
        <div className="min-w-60 flex-1">
          <TextField label="Recipient" type="email" placeholder="name@example.com" value={draft} onChange={(e) => setDraft(e.target.value)} />
        </div>
        <Button type="submit">Filter</Button>
      </form>
      {list.isPending ? (
        <Spinner />
      ) : list.isError ? (
        <Notice tone="error">{list.error.message}</Notice>
      ) : list.data.length === 0 ? (
        <Notice>No messages{to ? ` to ${to}` : ""} yet.</Notice>
      ) : (
        <ul className="divide-y divide-rule border border-rule bg-sheet" aria-label="Messages, newest first">
          {list.data.map((m) => (
            <li key={m.id}>
              <Link to={`/office/outbox/${m.id}`} className="grid gap-1 px-4 py-3 hover:bg-paper sm:grid-cols-[1fr_auto]">
                <span className="min-w-0">
                  <span className="block truncate font-medium">{m.subject || "(no subject)"}</span>
                  <span className="block truncate text-sm text-ink-soft">to {m.to}</span>
                </span>
                <span className="tabular text-sm text-ink-faint">{formatInstant(m.receivedAt)}</span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </>
  );
}

type View = "html" | "text" | "headers";

export function OutboxMessagePage() {
  const id = Number(useParams().id);
  const msg = useOutboxMessage(id);
  const [view, setView] = useState<View>("html");
  if (msg.isPending) return <Spinner />;
  if (msg.isError) return <Notice tone="error">{msg.error.message}</Notice>;
  const m = msg.data;
  return (
    <>
      <PageHeader sheet={`Site office · Outbox · message ${m.id}`} title={m.subject || "(no subject)"} description={`From ${m.from} to ${m.to} · ${formatInstant(m.receivedAt)}`} />
      <p className="mb-4 text-sm">
        <Link to="/office/outbox" className="text-accent underline underline-offset-4">
          ← All messages
        </Link>
      </p>
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
        <a className="ml-auto self-center text-sm text-accent underline underline-offset-4" href={`/api/outbox/${m.id}/raw`}>
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
