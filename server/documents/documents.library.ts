import type { DocumentAnswer, DocumentCategory, DocumentCreateFields, DocumentPatchInput } from "#shared/schemas/documents.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { changeDetail, changedFields, invalidFields, staleVersion, uniqueSorted } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import type { ReceivedFile } from "../media/media.storage.ts";
import type { DocumentsContext, Trx } from "./documents.context.ts";
import { takeFile, type TakenFile } from "./documents.intake.ts";
import {
  countVersionsWithKey,
  deleteDocument,
  findDocument,
  findLastVisit,
  insertDocument,
  insertVersion,
  listDocuments,
  listVersions,
  listVersionsUploadedIn,
  recordVisit,
  setDocumentOrganisations,
  updateDocument,
  type DocumentRecord,
  type DocumentScope,
  type VersionRecord,
} from "./documents.repository.ts";

const EXTENSION = { pdf: "pdf", jpeg: "jpg", png: "png", webp: "webp" } as const;

/** Storage key of a stored file: its SHA-256, so the same bytes are kept once. */
const storageKey = (f: TakenFile) => `documents/${f.sha256.slice(0, 2)}/${f.sha256}.${EXTENSION[f.fileType]}`;

const missingFile = () => new AppError("no_file", "Choose a file: send it as multipart/form-data in the field `file`.", 400, { file: "is required" });

/** A document moved in a digest's window: it arrived (version 1) or has a new version. Never a file link. */
export interface DocumentMove {
  id: number;
  title: string;
  audience: DocumentRecord["audience"];
  kind: "new" | "version";
  versionNumber: number;
  at: Date;
}

/** The library: documents and their versions, read by audience and written by leads and admins. */
export function createLibraryUseCases(ctx: DocumentsContext) {
  const { db, projects, storage, uploads, limits, accounts, organisations } = ctx;

  /** The answers of documents as this scope reads them (staff see the organisations; investors whether each is new to them). */
  async function answers(docs: DocumentRecord[], scope: DocumentScope, lastVisit: Date | null | undefined): Promise<DocumentAnswer[]> {
    const versions = await listVersions(db, docs.map((d) => d.id));
    const uploaders = await accounts.namesOf(uniqueSorted([...versions.values()].flat().flatMap((v) => (v.uploadedBy === null ? [] : [v.uploadedBy]))));
    const orgNames = scope.kind === "investor" ? new Map<number, string>() : await organisations.namesOf(uniqueSorted(docs.flatMap((d) => d.organisationIds)));
    const versionAnswer = (v: VersionRecord) => ({
      id: v.id,
      number: v.number,
      fileType: v.fileType,
      bytes: v.bytes,
      pages: v.pages,
      originalName: v.originalName,
      note: v.note,
      removed: v.removed,
      uploadedBy: v.uploadedBy === null ? null : (uploaders.get(v.uploadedBy) ?? null),
      uploadedAt: v.uploadedAt.toISOString(),
    });
    return docs.map((d) => {
      const all = versions.get(d.id) ?? [];
      const latest = all[0]!;
      const isNew = scope.kind === "investor" && (lastVisit === null || (lastVisit !== undefined && (d.createdAt > lastVisit || latest.uploadedAt > lastVisit)));
      return {
        id: d.id,
        title: d.title,
        category: d.category,
        period: d.period,
        periodEnd: d.periodEnd,
        audience: d.audience,
        organisations: scope.kind === "investor" ? [] : d.organisationIds.map((id) => ({ id, name: orgNames.get(id) ?? `#${id}` })),
        latestVersion: versionAnswer(latest),
        versions: all.map(versionAnswer),
        newSinceLastVisit: isNew,
        version: d.version,
        updatedAt: d.updatedAt.toISOString(),
      };
    });
  }

  /** Organisation ids that name no organisation, and limits on a document investors cannot see: 422 fields. */
  async function checkOrganisations(ids: readonly number[], audience: DocumentRecord["audience"], fields: Record<string, string>): Promise<void> {
    if (ids.length === 0) return;
    if (audience !== "investor") fields.organisationIds = "apply to investor documents only: an internal document is never shown to investors";
    const known = await organisations.namesOf(ids);
    const unknown = ids.filter((id) => !known.has(id));
    if (unknown.length > 0) fields.organisationIds = `names no organisation: ${unknown.join(", ")}`;
  }

  /** Reads, checks and cleans a received file, stores it, and runs `write` with it; a refusal or a failed write leaves nothing. */
  async function withStoredFile<T>(file: ReceivedFile | undefined, check: () => Promise<void>, write: (taken: TakenFile, key: string) => Promise<T>): Promise<T> {
    try {
      await check();
      if (!file) throw missingFile();
      const taken = await takeFile(await uploads.read(file), limits);
      const key = storageKey(taken);
      await storage.put(key, taken.bytes);
      try {
        return await write(taken, key);
      } catch (err) {
        // Nothing half-made: a file no version names goes again.
        if ((await countVersionsWithKey(db, key)) === 0) await storage.delete(key);
        throw err;
      }
    } finally {
      if (file) await uploads.discard([file]);
    }
  }

  const versionFields = (taken: TakenFile, key: string, file: ReceivedFile, number: number, note: string, actor: Actor, at: Date) => ({
    number,
    fileType: taken.fileType,
    storageKey: key,
    bytes: taken.bytes.length,
    pages: taken.pages,
    sha256: taken.sha256,
    originalName: file.originalName,
    note,
    removed: taken.removed,
    uploadedBy: actor.user?.id ?? null,
    uploadedAt: at,
  });

  /** A document by id as a writer may change it: under its project's lock, its row locked. */
  async function change<T>(id: number, write: (trx: Trx, doc: DocumentRecord, project: Project) => Promise<T>): Promise<T> {
    const found = await findDocument(db, id, { kind: "all" });
    if (!found) throw notFound("That document");
    const project = await projects.getById(found.projectId);
    return db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      const doc = await findDocument(trx, id, { kind: "all" }, { forUpdate: true });
      if (!doc) throw notFound("That document");
      return write(trx, doc, project);
    });
  }

  async function one(id: number, scope: DocumentScope): Promise<DocumentAnswer> {
    const doc = await findDocument(db, id, scope);
    if (!doc) throw notFound("That document");
    return (await answers([doc], scope, undefined))[0]!;
  }

  return {
    /**
     * A project's documents as the caller may read them. For an investor, each says whether it is
     * new since their last visit to the documents, and this visit is then recorded.
     */
    async list(slug: string, filter: { category?: DocumentCategory }, actor: Actor): Promise<DocumentAnswer[]> {
      const project = await projects.get(slug);
      const scope = await ctx.scope(actor);
      const docs = await listDocuments(db, project.id, scope, filter);
      if (scope.kind !== "investor") return answers(docs, scope, undefined);
      const lastVisit = await findLastVisit(db, project.id, actor.user!.id);
      const out = await answers(docs, scope, lastVisit);
      await recordVisit(db, project.id, actor.user!.id, ctx.now());
      return out;
    },

    /** One document (404 for a caller who may not read it, as for one that does not exist). */
    get: async (id: number, actor: Actor): Promise<DocumentAnswer> => one(id, await ctx.scope(actor)),

    /** A new document with its first version: the file checked, cleaned and stored, the rows written in one transaction. */
    async create(slug: string, input: DocumentCreateFields, file: ReceivedFile | undefined, actor: Actor): Promise<DocumentAnswer> {
      let project: Project | undefined;
      const organisationIds = uniqueSorted(input.organisationIds);
      const id = await withStoredFile(
        file,
        async () => {
          project = await projects.get(slug);
          const fields: Record<string, string> = {};
          await checkOrganisations(organisationIds, input.audience, fields);
          if (Object.keys(fields).length > 0) throw invalidFields(fields, "invalid_document");
        },
        (taken, key) =>
          db.transaction(async (trx) => {
            const at = ctx.now();
            const docId = await insertDocument(trx, project!.id, input, at);
            await setDocumentOrganisations(trx, docId, organisationIds);
            await insertVersion(trx, docId, versionFields(taken, key, file!, 1, "", actor, at));
            await ctx.recordWrite(trx, actor, project!, {
              action: "document_created",
              documentId: docId,
              title: input.title,
              at,
              events: [
                { documentId: docId, field: "created", from: null, to: input.title, note: null },
                ...(taken.removed.length > 0 ? [{ documentId: docId, field: "removed_content", from: null, to: "version 1", note: taken.removed.join("; ") }] : []),
              ],
              detail: { audience: input.audience, category: input.category, organisationIds, file: { name: file!.originalName, type: taken.fileType, bytes: taken.bytes.length, pages: taken.pages, sha256: taken.sha256 }, removed: taken.removed },
            });
            return docId;
          }),
      );
      return one(id, { kind: "all" });
    },

    /**
     * A document made by the server itself (an issued report's PDF), in the caller's transaction
     * (which holds the project's lock): the bytes pass the same intake checks as an upload, are
     * stored, and the rows, event and audit entry are written as for `create`. A file left stored
     * by a transaction that then rolls back is harmless: its key is its hash, and the next store
     * of the same bytes reuses it.
     */
    async createFromGenerated(trx: Trx, project: Project, input: DocumentCreateFields, file: { bytes: Uint8Array; name: string }, actor: Actor): Promise<number> {
      const taken = await takeFile(Buffer.from(file.bytes), limits);
      const key = storageKey(taken);
      await storage.put(key, taken.bytes);
      const at = ctx.now();
      const docId = await insertDocument(trx, project.id, input, at);
      await insertVersion(trx, docId, { number: 1, fileType: taken.fileType, storageKey: key, bytes: taken.bytes.length, pages: taken.pages, sha256: taken.sha256, originalName: file.name, note: "", removed: taken.removed, uploadedBy: actor.user?.id ?? null, uploadedAt: at });
      await ctx.recordWrite(trx, actor, project, {
        action: "document_created",
        documentId: docId,
        title: input.title,
        at,
        events: [{ documentId: docId, field: "created", from: null, to: input.title, note: "generated" }],
        detail: { audience: input.audience, category: input.category, generated: true, file: { name: file.name, type: taken.fileType, bytes: taken.bytes.length, pages: taken.pages, sha256: taken.sha256 } },
      });
      return docId;
    },

    /** A new version of a document: the older ones stay, with their view logs. */
    async addVersion(id: number, input: { note: string }, file: ReceivedFile | undefined, actor: Actor): Promise<DocumentAnswer> {
      await withStoredFile(
        file,
        async () => {
          if (!(await findDocument(db, id, { kind: "all" }))) throw notFound("That document");
        },
        (taken, key) =>
          change(id, async (trx, doc, project) => {
            const at = ctx.now();
            const number = ((await listVersions(trx, [id])).get(id)?.[0]?.number ?? 0) + 1;
            await insertVersion(trx, id, versionFields(taken, key, file!, number, input.note, actor, at));
            await updateDocument(trx, id, {}, at);
            await ctx.recordWrite(trx, actor, project, {
              action: "document_version_added",
              documentId: id,
              title: doc.title,
              at,
              events: [
                { documentId: id, field: "version", from: String(number - 1), to: String(number), note: input.note || null },
                ...(taken.removed.length > 0 ? [{ documentId: id, field: "removed_content", from: null, to: `version ${number}`, note: taken.removed.join("; ") }] : []),
              ],
              detail: { version: number, note: input.note, file: { name: file!.originalName, type: taken.fileType, bytes: taken.bytes.length, pages: taken.pages, sha256: taken.sha256 }, removed: taken.removed },
            });
          }),
      );
      return one(id, { kind: "all" });
    },

    /** Edits a document's fields (and organisations); 409 when someone changed it since the caller loaded it. */
    async patch(id: number, input: DocumentPatchInput, actor: Actor): Promise<DocumentAnswer> {
      const { version, ...patch } = input;
      await change(id, async (trx, doc, project) => {
        if (doc.version !== version) throw staleVersion("document", (await answers([doc], { kind: "all" }, undefined))[0]);
        const organisationIds = patch.organisationIds === undefined ? doc.organisationIds : uniqueSorted(patch.organisationIds);
        const fields: Record<string, string> = {};
        await checkOrganisations(organisationIds, patch.audience ?? doc.audience, fields);
        if (Object.keys(fields).length > 0) throw invalidFields(fields, "invalid_document");
        const was = { title: doc.title, category: doc.category, period: doc.period, periodEnd: doc.periodEnd, audience: doc.audience, organisationIds: doc.organisationIds };
        const will = { ...was, ...patch, organisationIds };
        const changes = changedFields(was, will);
        if (changes.length === 0) return;
        const at = ctx.now();
        await updateDocument(trx, id, patch, at);
        await setDocumentOrganisations(trx, id, organisationIds);
        await ctx.recordWrite(trx, actor, project, {
          action: "document_updated",
          documentId: id,
          title: will.title,
          at,
          events: changes.map((c) => ({ documentId: id, ...c, note: null })),
          detail: { changes: changeDetail(was, will) },
        });
      });
      return one(id, { kind: "all" });
    },

    /**
     * Deletes a document, its versions, their stored files and its view log (decision 038); the
     * project's history keeps one `deleted` event and the audit log keeps what it was and how
     * often it had been read.
     */
    async remove(id: number, actor: Actor): Promise<void> {
      const keys = await change(id, async (trx, doc, project) => {
        const versions = (await listVersions(trx, [id])).get(id) ?? [];
        await deleteDocument(trx, id);
        const at = ctx.now();
        await ctx.recordWrite(trx, actor, project, {
          action: "document_deleted",
          documentId: id,
          title: doc.title,
          at,
          events: [{ documentId: null, field: "deleted", from: doc.title, to: null, note: `document #${id}, ${versions.length} version(s)` }],
          detail: {
            audience: doc.audience,
            category: doc.category,
            organisationIds: doc.organisationIds,
            versions: versions.map((v) => ({ number: v.number, name: v.originalName, sha256: v.sha256 })),
          },
        });
        return uniqueKeys(versions);
      });
      for (const key of keys) if ((await countVersionsWithKey(db, key)) === 0) await storage.delete(key);
    },

    /** Which of `ids` are documents of the project (decisions attach them), whatever their audience. */
    async documentIdsOf(projectId: number, ids: readonly number[]): Promise<Set<number>> {
      if (ids.length === 0) return new Set();
      const docs = await listDocuments(db, projectId, { kind: "all" });
      return new Set(docs.filter((d) => ids.includes(d.id)).map((d) => d.id));
    },

    /** Titles of the documents among `ids` that `actor` may read (an investor only their organisation's), without recording a visit. */
    async documentsNamed(projectId: number, ids: readonly number[], actor: Actor): Promise<Array<{ id: number; title: string }>> {
      if (ids.length === 0) return [];
      const docs = await listDocuments(db, projectId, await ctx.scope(actor));
      return docs.filter((d) => ids.includes(d.id)).map((d) => ({ id: d.id, title: d.title }));
    },

    /**
     * Documents that arrived or gained a version in [from, to), for a digest written for `viewer`:
     * investors are told only of investor documents not limited to organisations (a digest goes
     * to every investor subscriber), staff of all. Titles and ids only: never a file or its link.
     */
    async movesIn(projectId: number, from: Date, to: Date, viewer: "investor" | "staff"): Promise<DocumentMove[]> {
      const scope: DocumentScope = viewer === "staff" ? { kind: "all" } : { kind: "investor", organisationId: null };
      const rows = await listVersionsUploadedIn(db, projectId, from, to, scope);
      return rows.map((r) => ({ id: r.documentId, title: r.title, audience: r.audience, kind: r.number === 1 ? "new" : "version", versionNumber: r.number, at: r.at }));
    },
  };
}

const uniqueKeys = (versions: VersionRecord[]) => [...new Set(versions.map((v) => v.storageKey))];
