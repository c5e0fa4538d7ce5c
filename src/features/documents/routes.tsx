import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { useState } from "react";
import { Button } from "../../components/ui/button.tsx";
import { Notice, Sheet } from "../../components/ui/sheet.tsx";
import { officePageLoader } from "../../lib/office-page.tsx";
import { canKeepRecord, RecordPage } from "../../lib/record.tsx";
import { meQueryOptions } from "../../lib/session.ts";
import { documentProjectQueryOptions, documentProjectsQueryOptions, documentsQueryOptions, organisationsQueryOptions } from "./api.ts";
import { EditDocumentForm, UploadForm, VersionForm } from "./components/document-forms.tsx";
import { DocumentTable } from "./components/document-table.tsx";
import { DocumentViewsDialog, ReaderLog } from "./components/view-log.tsx";

/** `/office/documents`: the project and its library. */
export const documentsLoader = officePageLoader(documentProjectsQueryOptions, (qc, slug) => Promise.all([qc.ensureQueryData(documentProjectQueryOptions(slug)), qc.ensureQueryData(documentsQueryOptions(slug))]));

type Open = { what: "upload" } | { what: "edit" | "version" | "views"; id: number };

function DocumentsBody({ slug }: { slug: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const project = useSuspenseQuery(documentProjectQueryOptions(slug)).data;
  const documents = useSuspenseQuery(documentsQueryOptions(slug)).data;
  const editable = canKeepRecord(me);
  const organisations = useQuery({ ...organisationsQueryOptions(), enabled: editable });
  const [open, setOpen] = useState<Open | null>(null);
  const close = () => setOpen(null);
  const doc = open && open.what !== "upload" ? documents.find((d) => d.id === open.id) : undefined;

  const dialog = (() => {
    if (!open) return null;
    if (open.what === "upload" && editable) return <UploadForm slug={slug} organisations={organisations.data ?? []} onClose={close} />;
    if (!doc) return null;
    if (open.what === "views") return <DocumentViewsDialog doc={doc} timeZone={project.timeZone} onClose={close} />;
    if (open.what === "edit" && editable) return <EditDocumentForm doc={doc} organisations={organisations.data ?? []} onClose={close} />;
    if (open.what === "version" && editable) return <VersionForm doc={doc} onClose={close} />;
    return null;
  })();

  return (
    <div className="flex flex-col gap-6">
      {editable ? null : <Notice>Read-only for your role: you see the documents shared with investors. Project leads and administrators keep the library.</Notice>}
      <Sheet
        label="Library"
        title="Documents"
        actions={
          editable ? (
            <Button size="sm" variant="primary" onClick={() => setOpen({ what: "upload" })}>
              Upload a document
            </Button>
          ) : null
        }
      >
        <p className="mb-3 text-sm text-ink-soft">Investors always receive a copy stamped with their name, organisation, e-mail and the time, made when they open it. Here you open the clean original.</p>
        <DocumentTable
          documents={documents}
          actions={{ onViews: (d) => setOpen({ what: "views", id: d.id }), ...(editable ? { onEdit: (d) => setOpen({ what: "edit", id: d.id }), onVersion: (d) => setOpen({ what: "version", id: d.id }) } : {}) }}
        />
      </Sheet>
      <Sheet label="Who read what" title="View log by reader">
        <ReaderLog slug={slug} timeZone={project.timeZone} />
      </Sheet>
      {dialog}
    </div>
  );
}

/** Site office › Documents: the library, its versions, and the log of who opened what. */
export function DocumentsPage() {
  return <RecordPage projects={documentProjectsQueryOptions} sheet="Site office · Documents" title="Documents" description="Monitoring reports, lender packs, certificates and other papers for investors, each copy traceable to its reader." body={DocumentsBody} />;
}
