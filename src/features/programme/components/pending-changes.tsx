import { useState } from "react";
import { toast } from "sonner";
import type { Milestone } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { TextField } from "../../../components/ui/field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { formatDate } from "../../../lib/format.ts";
import type { MilestoneDraft } from "../preview.ts";
import type { useDraftEditor } from "../use-draft-editor.ts";
import { AUDIENCE_WORD } from "../words.ts";
import { HealthPreview } from "./health-preview.tsx";

type Editor = ReturnType<typeof useDraftEditor>;

const FIELD_LABEL: Record<string, string> = {
  percentComplete: "Percent complete",
  forecastFinish: "Forecast finish",
  actualFinish: "Actual finish",
  audience: "Audience",
  weight: "Weight",
  plannedStart: "Planned start",
  dependsOn: "Depends on",
  form: "Not saved",
};

function show(field: keyof MilestoneDraft, v: unknown): string {
  if (v === null || v === undefined) return "none";
  if (field === "forecastFinish" || field === "actualFinish" || field === "plannedStart") return formatDate(String(v));
  if (field === "percentComplete") return `${String(v)}%`;
  if (field === "audience") return AUDIENCE_WORD[v as keyof typeof AUDIENCE_WORD] ?? String(v);
  return String(v);
}

/** A change that met someone else's: what they saved, what I meant, and the choice. */
function ConflictNotice({ editor, id, note }: { editor: Editor; id: number; note: string }) {
  const c = editor.conflicts[id];
  if (!c) return null;
  const fields = Object.keys(c.draft) as (keyof MilestoneDraft)[];
  return (
    <div data-testid="conflict">
      <Notice tone="caution" title={`${c.current.name} was changed by someone else since you opened it`}>
        <ul className="mt-1 list-none">
          {fields.map((f) => (
            <li key={f}>
              {FIELD_LABEL[f] ?? f}: now <span className="font-semibold text-ink">{show(f, c.current[f as keyof Milestone])}</span>; yours{" "}
              <span className="font-semibold text-ink">{show(f, c.draft[f])}</span>
            </li>
          ))}
        </ul>
        <div className="mt-2 flex flex-wrap gap-2">
          <Button size="sm" variant="primary" onClick={() => void editor.reapply(id, note).then((ok) => ok && toast.success("Your change was applied on top"))}>
            Reapply my change
          </Button>
          <Button size="sm" onClick={() => editor.discard(id)}>
            Keep the current values
          </Button>
        </div>
      </Notice>
    </div>
  );
}

/** The pending changes of the programme table: their effect, their problems, and save or discard. */
export function PendingChanges({ editor, milestones }: { editor: Editor; milestones: Milestone[] }) {
  const [note, setNote] = useState("");
  const ids = Object.keys(editor.drafts).map(Number);
  const conflictIds = Object.keys(editor.conflicts).map(Number);
  if (ids.length === 0 && conflictIds.length === 0) return null;
  const errorList = Object.entries(editor.errors).flatMap(([id, fields]) =>
    Object.entries(fields).map(([f, msg]) => ({ id: Number(id), name: milestones.find((m) => m.id === Number(id))?.name ?? id, field: FIELD_LABEL[f] ?? f, msg })),
  );
  const blocked = errorList.length > 0;
  return (
    <div className="sticky bottom-0 z-10 flex flex-col gap-2 bg-paper py-2" data-testid="pending-changes">
      {conflictIds.map((id) => (
        <ConflictNotice key={id} editor={editor} id={id} note={note} />
      ))}
      {editor.preview && ids.length > 0 ? (
        <HealthPreview preview={editor.preview} title={`Before you save: ${ids.length} change${ids.length === 1 ? "" : "s"} not yet saved`}>
          <div className="flex w-full flex-col gap-2">
            {errorList.length > 0 ? (
              <ul className="text-sm text-bad" role="alert">
                {errorList.map((e) => (
                  <li key={`${e.id}-${e.field}`}>
                    ▲ {e.name} — {e.field}: {e.msg}
                  </li>
                ))}
              </ul>
            ) : null}
            <div className="flex flex-wrap items-end gap-2">
              <div className="min-w-56 flex-1">
                <TextField label="Note for the history (optional)" value={note} onChange={(e) => setNote(e.target.value)} maxLength={1000} />
              </div>
              <Button
                variant="primary"
                busy={editor.saving}
                disabled={blocked}
                onClick={() =>
                  void editor.saveAll(note).then((n) => {
                    if (n > 0) {
                      toast.success(n === 1 ? "Change saved" : `${n} changes saved`);
                      setNote("");
                    }
                  })
                }
              >
                Save {ids.length === 1 ? "change" : `${ids.length} changes`}
              </Button>
              <Button onClick={() => editor.discard()}>Discard</Button>
            </div>
          </div>
        </HealthPreview>
      ) : null}
    </div>
  );
}
