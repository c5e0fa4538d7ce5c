import { useCallback, useMemo, useState } from "react";
import { MilestonePatchInputSchema, type Milestone } from "#shared/schemas/programme.ts";
import type { ProgrammeSettings } from "#shared/domain/programme-health.ts";
import { ApiError } from "../../lib/api-client.ts";
import { conflictCurrent, usePatchMilestone } from "./api.ts";
import { patchChangesSomething, patchOf, previewDrafts, type Drafts, type MilestoneDraft, type PreviewResult } from "./preview.ts";

export interface Conflict {
  /** The milestone as someone else left it. */
  current: Milestone;
  draft: MilestoneDraft;
}

/** Field errors of a pending change, from the same schema the server parses plus the rule the server adds (no actual finish in the future). */
export function draftErrors(m: Milestone, draft: MilestoneDraft, at: string): Record<string, string> {
  const errors: Record<string, string> = {};
  const parsed = MilestonePatchInputSchema.safeParse(patchOf(m, draft));
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const key = String(issue.path[0] ?? "form");
      errors[key] ??= issue.message;
    }
  }
  const actual = draft.actualFinish ?? null;
  if (draft.actualFinish !== undefined && actual !== null && actual > at) errors.actualFinish ??= "must not be in the future";
  return errors;
}

function sameValue(a: unknown, b: unknown): boolean {
  return a === b || (typeof a === "number" && typeof b === "number" && Number.isNaN(a) && Number.isNaN(b));
}

/**
 * Pending changes to milestones, their live preview, and saving them with the version
 * each was read at: a stale version comes back as a conflict to show and reapply.
 */
export function useDraftEditor({ slug, milestones, settings, at }: { slug: string; milestones: Milestone[]; settings: ProgrammeSettings | null; at: string }) {
  const [drafts, setDrafts] = useState<Drafts>({});
  const [serverErrors, setServerErrors] = useState<Record<number, Record<string, string>>>({});
  const [conflicts, setConflicts] = useState<Record<number, Conflict>>({});
  const [saving, setSaving] = useState(false);
  const patch = usePatchMilestone(slug);

  const setDraft = useCallback(
    (id: number, change: MilestoneDraft) => {
      const m = milestones.find((x) => x.id === id);
      if (!m) return;
      setDrafts((all) => {
        const next: MilestoneDraft = { ...(all[id] ?? {}), ...change };
        // A field set back to what is saved is no longer a change.
        for (const k of Object.keys(next) as (keyof MilestoneDraft)[]) if (sameValue(next[k], m[k])) delete next[k];
        const copy = { ...all };
        if (Object.keys(next).length === 0) delete copy[id];
        else copy[id] = next;
        return copy;
      });
      setServerErrors((e) => {
        if (!e[id]) return e;
        const copy = { ...e };
        delete copy[id];
        return copy;
      });
    },
    [milestones],
  );

  const discard = useCallback((id?: number) => {
    if (id === undefined) {
      setDrafts({});
      setServerErrors({});
      setConflicts({});
      return;
    }
    for (const set of [setDrafts, setServerErrors, setConflicts] as Array<React.Dispatch<React.SetStateAction<Record<number, unknown>>>>) {
      set((all) => {
        const copy = { ...all };
        delete copy[id];
        return copy;
      });
    }
  }, []);

  const errors = useMemo(() => {
    const out: Record<number, Record<string, string>> = {};
    for (const [idText, d] of Object.entries(drafts)) {
      const id = Number(idText);
      const m = milestones.find((x) => x.id === id);
      if (!m) continue;
      const e = { ...draftErrors(m, d, at), ...(serverErrors[id] ?? {}) };
      if (Object.keys(e).length > 0) out[id] = e;
    }
    return out;
  }, [drafts, milestones, at, serverErrors]);

  const preview: PreviewResult | null = useMemo(
    () => (settings && Object.keys(drafts).length > 0 ? previewDrafts(milestones, drafts, settings, at) : null),
    [milestones, drafts, settings, at],
  );

  const previewed = useMemo(() => {
    const out: Record<number, { status: Milestone["status"]; slipDays: number }> = {};
    for (const s of preview?.statuses ?? []) out[s.id] = { status: s.after, slipDays: s.slipAfter };
    return out;
  }, [preview]);

  /** Saves one milestone's change (against `base`, normally the loaded milestone). Resolves true when saved. */
  const saveOne = useCallback(
    async (id: number, note?: string, base?: Milestone): Promise<boolean> => {
      const m = base ?? milestones.find((x) => x.id === id);
      const d = drafts[id];
      if (!m || !d) return false;
      const body = patchOf(m, d, note);
      if (!patchChangesSomething(body)) {
        discard(id);
        return true;
      }
      try {
        await patch.mutateAsync({ id, patch: body });
        discard(id);
        return true;
      } catch (e) {
        const current = conflictCurrent(e);
        if (current) {
          setConflicts((c) => ({ ...c, [id]: { current, draft: d } }));
        } else if (e instanceof ApiError) {
          setServerErrors((s) => ({ ...s, [id]: Object.keys(e.fields).length > 0 ? e.fields : { form: e.message } }));
        } else {
          setServerErrors((s) => ({ ...s, [id]: { form: e instanceof Error ? e.message : "Not saved." } }));
        }
        return false;
      }
    },
    [drafts, milestones, patch, discard],
  );

  const saveAll = useCallback(
    async (note?: string): Promise<number> => {
      setSaving(true);
      let saved = 0;
      try {
        for (const id of Object.keys(drafts).map(Number)) {
          if (errors[id] && !serverErrors[id]) continue;
          if (await saveOne(id, note)) saved += 1;
        }
      } finally {
        setSaving(false);
      }
      return saved;
    },
    [drafts, errors, serverErrors, saveOne],
  );

  /** Applies my change on top of the current values someone else saved. */
  const reapply = useCallback(
    async (id: number, note?: string) => {
      const c = conflicts[id];
      if (!c) return false;
      setConflicts((all) => {
        const copy = { ...all };
        delete copy[id];
        return copy;
      });
      return saveOne(id, note, c.current);
    },
    [conflicts, saveOne],
  );

  return { drafts, setDraft, discard, errors, preview, previewed, conflicts, saveOne, saveAll, reapply, saving: saving || patch.isPending };
}
