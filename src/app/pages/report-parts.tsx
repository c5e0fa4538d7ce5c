import { lazy, useMemo, useState, type ReactNode } from "react";
import type { ReportFigures } from "#shared/domain/report-figures.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { CommentaryEditorProps, ReportParts } from "../../features/reports/components/report-parts.ts";
import { ReportPartsContext } from "../../features/reports/components/report-parts.ts";

// The charts (recharts), the editor (tiptap) and the PDF reader (pdf.js) each load only when a report draws one.
const Ramp = lazy(() => import("../../features/public-site/components/facility-ramp-chart.tsx").then((m) => ({ default: ({ figures }: { figures: ReportFigures }) => <m.CapacityRampChart ramp={figures.facility.ramp} /> })));
const Walk = lazy(() => import("../../features/budget/investor-budget-walk.tsx").then((m) => ({ default: ({ figures }: { figures: ReportFigures }) => <div data-testid="budget-walk"><m.BudgetWalkChart position={figures.budget} /></div> })));
const Grid = lazy(() => import("../../features/risks/investor-risk-grid.tsx").then((m) => ({ default: ({ figures }: { figures: ReportFigures }) => <m.RiskGridChart summary={figures.risks} /> })));
const PdfViewer = lazy(() => import("../../features/documents/investor-pdf-viewer.tsx").then((m) => ({ default: m.PdfViewer })));
const RichTextEditor = lazy(() => import("../../features/posts/components/rich-text-editor.tsx").then((m) => ({ default: m.RichTextEditor })));

/** The updates' editor for one section's commentary: photos it inserts are kept for its previews; no milestone blocks are offered. */
function CommentaryEditor({ slug, label, initial, onChange }: CommentaryEditorProps) {
  const [pictures, setPictures] = useState<ReadonlyMap<number, MediaPicture>>(new Map());
  const data = useMemo(() => ({ pictures, milestones: new Map(), problems: [], onFixPhoto: () => undefined }), [pictures]);
  return <RichTextEditor slug={slug} label={label} initial={initial} onChange={onChange} data={data} milestones={[]} onPicture={(p) => setPictures((m) => new Map(m).set(p.id, p))} />;
}

const PARTS: ReportParts = { Ramp, Walk, Grid, PdfViewer, Editor: CommentaryEditor };

/** A report page with the charts, the editor and the reader of the features that own them. */
export function WithReportParts({ children }: { children: ReactNode }) {
  return <ReportPartsContext.Provider value={PARTS}>{children}</ReportPartsContext.Provider>;
}
