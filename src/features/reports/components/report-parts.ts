import { createContext, useContext, type ComponentType } from "react";
import type { ReportFigures } from "#shared/domain/report-figures.ts";
import type { RichTextDoc } from "#shared/schemas/rich-text.ts";

/** The commentary editor the site office writes with: the same one as updates. */
export interface CommentaryEditorProps {
  slug: string;
  label: string;
  initial: RichTextDoc;
  onChange: (doc: RichTextDoc) => void;
}

/**
 * What a report's pages share with other features: the capacity ramp, budget walk and risk grid
 * charts, the updates' rich-text editor and the stamped PDF reader. Features never import each
 * other, so the app layer hands these in (src/app/pages/report-pages.tsx); a chart left out
 * leaves its figures to read on their own.
 */
export interface ReportParts {
  Ramp?: ComponentType<{ figures: ReportFigures }>;
  Walk?: ComponentType<{ figures: ReportFigures }>;
  Grid?: ComponentType<{ figures: ReportFigures }>;
  Editor?: ComponentType<CommentaryEditorProps>;
  PdfViewer?: ComponentType<{ bytes: ArrayBuffer; title: string }>;
}

export const ReportPartsContext = createContext<ReportParts>({});
export const useReportParts = () => useContext(ReportPartsContext);
