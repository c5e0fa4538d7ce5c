import type { Readable } from "node:stream";
import type { ViewKind } from "#shared/schemas/documents.ts";
import { AppError, forbidden, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import { momentInWords, type DocumentsContext } from "./documents.context.ts";
import { MIME_OF } from "./documents.intake.ts";
import { findDocument, insertView, listVersions } from "./documents.repository.ts";
import { stampForReader } from "./documents.stamp.ts";

/** What the router sends: a copy made for the reader (bytes) or the stored original (a stream). */
export type ServedFile = { name: string; mime: string; disposition: "inline" | "attachment" } & ({ bytes: Uint8Array } | { stream: Readable; length: number });

/** The file's name as sent: the stored name, as a PDF when the copy is one. */
function nameOf(original: string, asPdf: boolean): string {
  if (!asPdf || /\.pdf$/i.test(original)) return original;
  return `${original.replace(/\.[a-z0-9]{1,5}$/i, "")}.pdf`;
}

export function createFileUseCases(ctx: DocumentsContext) {
  const { db, projects, storage, accounts, organisations } = ctx;

  return {
    /**
     * A version of a document (the latest unless asked). An investor always receives a copy
     * stamped for them, made now and never stored, and the view is written to the log exactly once
     * per request (`record`: false for a HEAD, which sends no file). Staff receive the stored,
     * clean original; their reads are not part of the view log (decision 038).
     */
    async file(id: number, q: { version?: number; as: ViewKind; clean?: "1" }, actor: Actor, client: { address: string; agent: string; record: boolean }): Promise<ServedFile> {
      const scope = await ctx.scope(actor);
      const doc = await findDocument(db, id, scope);
      if (!doc) throw notFound("That document");
      if (scope.kind === "investor" && q.clean) throw forbidden("Clean originals are for staff; your copy is marked for you.");
      const versions = (await listVersions(db, [id])).get(id) ?? [];
      const version = q.version === undefined ? versions[0] : versions.find((v) => v.number === q.version);
      if (!version) throw notFound("That version");
      const disposition = q.as === "view" ? "inline" : "attachment";

      if (scope.kind !== "investor") {
        const stored = await storage.stream(version.storageKey);
        if (!stored) throw new AppError("file_missing", "The stored file of this version is missing.", 404);
        return { name: version.originalName, mime: MIME_OF[version.fileType], disposition, stream: stored.stream, length: stored.bytes };
      }

      const stored = await storage.get(version.storageKey);
      if (!stored) throw new AppError("file_missing", "The stored file of this version is missing.", 404);
      const user = actor.user!;
      const [account, organisation, project] = await Promise.all([accounts.findById(user.id), organisations.ofUser(user.id), projects.getById(doc.projectId)]);
      const at = ctx.now();
      const bytes = await stampForReader(stored, version.fileType, {
        name: account?.name ?? user.name,
        email: account?.email ?? user.email,
        organisation: organisation?.name ?? null,
        madeAt: momentInWords(at, project),
      });
      if (client.record) {
        await insertView(db, { projectId: doc.projectId, documentId: id, versionId: version.id, userId: user.id, kind: q.as, at, address: client.address, agent: client.agent });
      }
      return { name: nameOf(version.originalName, true), mime: "application/pdf", disposition, bytes };
    },
  };
}
