import { useQuery, useSuspenseQuery, type QueryKey, type UseQueryOptions, type UseSuspenseQueryOptions } from "@tanstack/react-query";
import { useDeferredValue, useState } from "react";
import type { DigestArchiveCopy, DigestArchiveItem, DigestArchivePage } from "#shared/schemas/digests.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Pager } from "../../../components/ui/pager.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { formatDate } from "../../../lib/format.ts";

/** The days a digest covered: "3 Nov 2026" or "2 Nov 2026 – 8 Nov 2026". */
const windowWords = (d: Pick<DigestArchiveItem, "firstDay" | "lastDay">) => (d.firstDay === d.lastDay ? formatDate(d.firstDay) : `${formatDate(d.firstDay)} – ${formatDate(d.lastDay)}`);

/** One archived digest: what the archive withheld, said first, then the copy in a frame that runs no script. */
function ArchivedCopy<K extends QueryKey>({ options, item }: { options: UseQueryOptions<DigestArchiveCopy, Error, DigestArchiveCopy, K>; item: DigestArchiveItem }) {
  const copy = useQuery(options);
  if (copy.isPending) return <Spinner label="Opening the digest" />;
  if (copy.isError) return <Notice tone="error" title="This digest could not be opened">{copy.error.message}</Notice>;
  const c = copy.data;
  return (
    <div className="flex flex-col gap-3">
      {c.withheld ? <Notice tone="caution" title={c.withheld.whole ? "Withheld" : "Part withheld"}>{c.withheld.notice}</Notice> : null}
      {c.html !== null ? (
        // allow-same-origin only, as the office's preview: no scripts, forms or pop-ups run inside.
        <iframe title={`Digest sent ${formatDate(item.sentAt)}: ${item.subject}`} className="h-[36rem] w-full border border-rule bg-white" sandbox="allow-same-origin" srcDoc={c.html} />
      ) : null}
    </div>
  );
}

/**
 * A subscriber's past digests, newest first, 20 a page; each opens as it was sent, less anything
 * that has since become hidden from its reader (the page says so). The list follows the page in
 * state through `useDeferredValue`, so the last page stays on screen while the next one loads.
 */
export function DigestArchive<ListKey extends QueryKey, CopyKey extends QueryKey>({
  listOptions,
  copyOptions,
  emptyText,
}: {
  listOptions: (page: number) => UseSuspenseQueryOptions<DigestArchivePage, Error, DigestArchivePage, ListKey>;
  copyOptions: (id: number) => UseQueryOptions<DigestArchiveCopy, Error, DigestArchiveCopy, CopyKey>;
  emptyText: string;
}) {
  const [page, setPage] = useState(1);
  const shownPage = useDeferredValue(page);
  const data = useSuspenseQuery(listOptions(shownPage)).data;
  const [open, setOpen] = useState<number | null>(null);
  const pages = Math.max(1, Math.ceil(data.total / data.pageSize));
  if (data.total === 0) return <p className="text-sm text-ink-soft">{emptyText}</p>;
  return (
    <div className="flex flex-col gap-3">
      <ol className="flex flex-col divide-y divide-rule border border-rule" aria-label="Past digests, newest first">
        {data.items.map((d) => (
          <li key={d.id} className="flex flex-col gap-2 p-3">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <div>
                <p className="font-medium">{d.subject}</p>
                <p className="text-sm text-ink-soft">
                  Sent {formatDate(d.sentAt)} · covers {windowWords(d)}
                </p>
              </div>
              <Button size="sm" aria-expanded={open === d.id} onClick={() => setOpen(open === d.id ? null : d.id)}>
                {open === d.id ? "Close" : "Read"}
              </Button>
            </div>
            {open === d.id ? <ArchivedCopy options={copyOptions(d.id)} item={d} /> : null}
          </li>
        ))}
      </ol>
      <Pager page={shownPage} pages={pages} onPage={setPage} previous="← Newer" next="Older →" summary={` · ${data.total} digests`} />
    </div>
  );
}
