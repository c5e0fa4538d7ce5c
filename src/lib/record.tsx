import { useSuspenseQuery } from "@tanstack/react-query";
import type { ComponentType, ReactNode } from "react";
import type { User } from "#shared/schemas/auth.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { Notice } from "../components/ui/sheet.tsx";
import { OfficeProjectPage } from "./office-page.tsx";
import { meQueryOptions } from "./session.ts";
import { AUDIENCE_WORD } from "./words.ts";
import { useProjectParam, type projectListQueryOptions } from "./projects.ts";

/*
 * What the site office's pages of the investor record (risks, decisions, budget, documents,
 * reports) share: who keeps the record, its two audiences, and the frame of their pages.
 */

/** Lead and admin keep the record; marketing reads its investor-audience items (the server filters). */
export function canKeepRecord(user: User | null | undefined): boolean {
  return user?.role === "lead" || user?.role === "admin";
}

/** Nothing of the record is ever public: investors, or staff only. */
export const RECORD_AUDIENCE_WORD: Record<RecordAudience, string> = { investor: AUDIENCE_WORD.investor, internal: AUDIENCE_WORD.internal };
export const RECORD_AUDIENCE_OPTIONS = (["investor", "internal"] as const).map((a) => ({ value: a, label: RECORD_AUDIENCE_WORD[a] }));

/**
 * A record page: its head, the project picker, and the page's body for the chosen project in a
 * block of its own. With `keepersOnly`, callers who do not keep the record read that notice instead.
 */
export function RecordPage({ projects, body: Body, keepersOnly, ...head }: { projects: () => ReturnType<typeof projectListQueryOptions>; sheet: string; title: string; description: ReactNode; body: ComponentType<{ slug: string }>; keepersOnly?: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  return (
    <OfficeProjectPage project={useProjectParam(useSuspenseQuery(projects()).data)} pickerClassName="mb-4 w-64" {...head}>
      {(slug) => <div>{keepersOnly && !canKeepRecord(me) ? <Notice>{keepersOnly}</Notice> : <Body slug={slug} />}</div>}
    </OfficeProjectPage>
  );
}
