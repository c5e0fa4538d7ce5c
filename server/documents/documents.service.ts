import { createDocumentsContext, type DocumentOrganisations, type DocumentsDeps } from "./documents.context.ts";
import { createFileUseCases } from "./documents.files.ts";
import { createLibraryUseCases } from "./documents.library.ts";
import { createViewUseCases } from "./documents.views.ts";

export type { DocumentOrganisations, DocumentsDeps };

/**
 * The document library: one object for the router and the other modules, made of its use
 * cases, each in its own file —
 * - library (documents.library.ts): documents and versions by audience, the writes (each an
 *   event and an audit entry), and `movesIn` for digests;
 * - files (documents.files.ts): a version's file, stamped for an investor, clean for staff;
 * - views (documents.views.ts): the view log, per document, per reader, as CSV, and an
 *   investor's own.
 */
export function createDocumentsService(deps: DocumentsDeps) {
  const ctx = createDocumentsContext(deps);
  return {
    limits: deps.limits,
    ...createLibraryUseCases(ctx),
    ...createFileUseCases(ctx),
    ...createViewUseCases(ctx),
  };
}

export type DocumentsService = ReturnType<typeof createDocumentsService>;
