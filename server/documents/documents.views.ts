import Papa from "papaparse";
import type { ViewLogRow } from "#shared/schemas/documents.ts";
import { notFound } from "../core/app-error.ts";
import { uniqueSorted } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import type { DocumentsContext } from "./documents.context.ts";
import { findDocument, listViews, type ViewRecord } from "./documents.repository.ts";

const CSV_COLUMNS = ["at", "document", "version", "reader", "email", "organisation", "kind", "address", "agent"] as const;

/** The view log: staff read it per document and per reader (and export it); an investor reads their own. */
export function createViewUseCases(ctx: DocumentsContext) {
  const { db, projects, accounts, organisations } = ctx;

  /** Each row with its reader's name, address and organisation as they are now. */
  async function withReaders(rows: ViewRecord[]): Promise<ViewLogRow[]> {
    const readers = new Map<number, { name: string; email: string; organisation: string | null }>();
    for (const userId of uniqueSorted(rows.map((r) => r.userId))) {
      const [account, organisation] = await Promise.all([accounts.findById(userId), organisations.ofUser(userId)]);
      readers.set(userId, { name: account?.name ?? `#${userId}`, email: account?.email ?? "", organisation: organisation?.name ?? null });
    }
    return rows.map((r) => {
      const reader = readers.get(r.userId)!;
      return { ...r, at: r.at.toISOString(), reader: reader.name, email: reader.email, organisation: reader.organisation };
    });
  }

  return {
    /** Who read a document, which version, when, from where. */
    async documentViews(id: number, actor: Actor): Promise<ViewLogRow[]> {
      const scope = await ctx.scope(actor);
      const doc = await findDocument(db, id, scope);
      if (!doc) throw notFound("That document");
      return withReaders(await listViews(db, { projectId: doc.projectId, documentId: id, scope }));
    },

    /** A project's view log, optionally of one reader. */
    async projectViews(slug: string, q: { userId?: number }, actor: Actor): Promise<ViewLogRow[]> {
      const project = await projects.get(slug);
      return withReaders(await listViews(db, { projectId: project.id, userId: q.userId, scope: await ctx.scope(actor) }));
    },

    /** An investor's own log: what they opened and downloaded, newest first. */
    async myViews(slug: string, actor: Actor): Promise<ViewLogRow[]> {
      const project = await projects.get(slug);
      const scope = await ctx.scope(actor);
      return withReaders(await listViews(db, { projectId: project.id, userId: actor.user!.id, scope, limit: 500 }));
    },

    /**
     * The log as CSV for a spreadsheet. A cell that begins with =, +, -, @ (or a tab or carriage
     * return) is prefixed with a quote, so a reader's agent string cannot become a formula.
     */
    toCsv(rows: ViewLogRow[]): string {
      const data = rows.map((r) => [r.at, r.documentTitle, r.versionNumber, r.reader, r.email, r.organisation ?? "", r.kind, r.address, r.agent]);
      return `${Papa.unparse({ fields: [...CSV_COLUMNS], data }, { escapeFormulae: true, newline: "\r\n" })}\r\n`;
    },
  };
}
