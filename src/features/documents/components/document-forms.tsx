import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { DocumentCategorySchema, DocumentCreateFieldsSchema, type DocumentAnswer, type DocumentCreateFields } from "#shared/schemas/documents.ts";
import { FieldError, SelectField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { FormDialog, IdPicksField } from "../../../components/ui/form-dialog.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { changedFields, onSubmitted, optionsOf, pick, saveForm } from "../../../lib/forms.ts";
import { RECORD_AUDIENCE_OPTIONS } from "../../../lib/record.tsx";
import { usePatchDocument, useUploadDocument, useUploadVersion, type OrganisationRow } from "../api.ts";
import { CATEGORY_WORD, titleFromFileName } from "../words.ts";
import { FileDrop } from "./file-drop.tsx";

type Values = z.input<typeof DocumentCreateFieldsSchema>;

function valuesOf(d: DocumentAnswer | null): Values {
  if (!d) return { title: "", category: "monitoring_report", period: "", periodEnd: null, audience: "investor", organisationIds: [] };
  return { ...pick(d, ["title", "category", "period", "periodEnd", "audience"]), organisationIds: d.organisations.map((o) => o.id) };
}

/** A refused upload in words: the server's reason (415 type, 413 size, 422 encrypted or broken), said as it said it. */
export function refusalWords(e: unknown): string {
  if (e instanceof ApiError) {
    const lead = e.status === 415 ? "Not a PDF or an image" : e.status === 413 ? "Too large" : e.status === 422 ? "Refused" : "Not uploaded";
    return `${lead}: ${e.message}`;
  }
  return e instanceof Error ? e.message : "The file could not be uploaded.";
}

/** The document's own fields, for a new upload and for an edit alike. */
function DocumentFields({ form, organisations }: { form: ReturnType<typeof useForm<Values, unknown, DocumentCreateFields>>; organisations: readonly OrganisationRow[] }) {
  const { errors } = form.formState;
  return (
    <>
      <TextField label="Title" error={errors.title?.message} {...form.register("title")} />
      <SelectField label="Category" options={optionsOf(CATEGORY_WORD, DocumentCategorySchema.options)} error={errors.category?.message} {...form.register("category")} />
      <TextField label="Period" hint="e.g. November 2026, Q4 2026" error={errors.period?.message} {...form.register("period")} />
      <DateField label="Last day of the period" error={errors.periodEnd?.message} {...form.register("periodEnd", { setValueAs: (v: string | null) => (v === "" || v === null ? null : v) })} />
      <SelectField label="Audience" options={RECORD_AUDIENCE_OPTIONS} error={errors.audience?.message} {...form.register("audience")} />
      <div className="sm:col-span-2">
        <IdPicksField control={form.control} name="organisationIds" legend="Only for these investor organisations (none ticked: every investor)" options={organisations.map((o) => ({ id: o.id, label: o.name, hint: `${o.investors} investor${o.investors === 1 ? "" : "s"}` }))} empty="No investor organisation yet (an administrator adds them on the users page)." />
      </div>
    </>
  );
}

/** Uploading a document: the file first, then what it is and who may read it. The server's refusal is shown as it gave it. */
export function UploadForm({ slug, organisations, onClose }: { slug: string; organisations: readonly OrganisationRow[]; onClose: () => void }) {
  const upload = useUploadDocument(slug);
  const [file, setFile] = useState<File | null>(null);
  const [refusal, setRefusal] = useState<string | null>(null);
  const form = useForm<Values, unknown, DocumentCreateFields>({ resolver: zodResolver(DocumentCreateFieldsSchema), defaultValues: valuesOf(null) });
  const onFile = (f: File | null) => {
    setFile(f);
    setRefusal(null);
    if (f && !form.getValues("title")) form.setValue("title", titleFromFileName(f.name));
  };
  const onSubmit = form.handleSubmit(async (fields) => {
    if (!file) return setRefusal("Choose a file to upload.");
    try {
      await upload.mutateAsync({ file, fields });
      onClose();
    } catch (e) {
      if (e instanceof ApiError && Object.keys(e.fields).some((k) => k !== "file")) await saveForm(form.setError, () => Promise.reject(e), "");
      else setRefusal(refusalWords(e));
    }
  });
  return (
    <FormDialog title="Upload a document" onClose={onClose} onSubmit={onSubmit} busy={upload.isPending} rootError={form.formState.errors.root?.message} submitLabel="Upload">
      <div className="sm:col-span-2">
        <FileDrop file={file} onFile={onFile} label="The document's file" />
        <FieldError id="upload-refusal" error={refusal ?? undefined} />
      </div>
      <DocumentFields form={form} organisations={organisations} />
    </FormDialog>
  );
}

/** Editing what a document is and who may read it (its file changes only by a new version). */
export function EditDocumentForm({ doc, organisations, onClose }: { doc: DocumentAnswer; organisations: readonly OrganisationRow[]; onClose: () => void }) {
  const patch = usePatchDocument();
  const before = valuesOf(doc);
  const form = useForm<Values, unknown, DocumentCreateFields>({ resolver: zodResolver(DocumentCreateFieldsSchema), defaultValues: before });
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => patch.mutateAsync({ id: doc.id, patch: changedFields(before, v, doc.version) }), `${v.title} saved`)) onClose();
  });
  return (
    <FormDialog title={`Edit ${doc.title}`} onClose={onClose} onSubmit={onSubmit} busy={patch.isPending} rootError={form.formState.errors.root?.message}>
      <DocumentFields form={form} organisations={organisations} />
    </FormDialog>
  );
}

/** A new version of a document: the old ones and their view logs stay. */
export function VersionForm({ doc, onClose }: { doc: DocumentAnswer; onClose: () => void }) {
  const upload = useUploadVersion();
  const [file, setFile] = useState<File | null>(null);
  const [note, setNote] = useState("");
  const [refusal, setRefusal] = useState<string | null>(null);
  return (
    <FormDialog
      title={`New version of ${doc.title}`}
      onClose={onClose}
      busy={upload.isPending}
      submitLabel={`Upload version ${doc.latestVersion.number + 1}`}
      onSubmit={onSubmitted(() => {
        if (!file) return setRefusal("Choose a file to upload.");
        upload.mutate({ id: doc.id, file, note }, { onSuccess: onClose, onError: (err) => setRefusal(refusalWords(err)) });
      })}
    >
      <div className="sm:col-span-2">
        <FileDrop
          file={file}
          onFile={(f) => {
            setFile(f);
            setRefusal(null);
          }}
          label="The new version's file"
        />
        <FieldError id="version-refusal" error={refusal ?? undefined} />
      </div>
      <div className="sm:col-span-2">
        <TextField label="What changed" value={note} maxLength={500} onChange={(e) => setNote(e.target.value)} />
      </div>
    </FormDialog>
  );
}
