import { zodResolver } from "@hookform/resolvers/zod";
import type { UseMutationResult } from "@tanstack/react-query";
import { useCallback, useEffect, useRef, useState } from "react";
import { useForm, type DefaultValues, type FieldValues, type Path, type PathValue, type Resolver } from "react-hook-form";
import { toast } from "sonner";
import { z } from "zod";
import { ContentSlugSchema, type PostStatus, type PublishingProblem, type WorkflowAction, type WorkflowResult } from "#shared/schemas/publishing.ts";
import type { EditorFrame } from "../components/ui/editor-shell.tsx";
import { ApiError } from "./api-client.ts";
import { formatInstant } from "./format.ts";
import { publishingProblemsOf, type WorkflowInput } from "./publishing.ts";

/** An address field of a draft: empty means "make one from the title"; anything else is checked as the server checks it. */
export const DraftAddressSchema = z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? undefined : v), ContentSlugSchema.optional());

/** What the toast says once a workflow step went through. */
export const STEP_DONE: Record<WorkflowAction, string> = {
  submit: "Submitted for review",
  approve: "Approved",
  return: "Returned to the writer with your comments",
  publish: "Published",
  schedule: "Scheduled",
  withdraw: "Withdrawn",
};

/** What happens next, said to someone with no step to take. */
export const WAITING_FOR: Record<PostStatus, string> = {
  draft: "Nothing to do here yet.",
  in_review: "Waiting for a lead to review it.",
  approved: "Approved: a lead publishes or schedules it.",
  scheduled: "Scheduled: it goes out by itself at the time shown above.",
  published: "Published. A lead or an admin can change or withdraw it.",
  withdrawn: "Withdrawn: no longer on the public pages.",
};

/** The item as the API answers with it: enough for the draft to follow its versions. */
export interface PublishedItem {
  id: number;
  version?: number;
  slug: string;
  projectSlug: string;
}

/** The item as it is now, from a 409 answer to a stale save (`error.current`). */
export function conflictOf<T>(e: unknown): T | null {
  if (!(e instanceof ApiError) || e.status !== 409) return null;
  const body = e.body as { error?: { current?: T } } | null;
  return body?.error?.current ?? null;
}

export interface PublishingDraftOptions<TItem extends PublishedItem, TValues extends FieldValues & { slug: string }, TCreate, TPatch> {
  /** The saved item, or null for a new one. */
  item: TItem | null;
  /** The form's values for a saved item, and for a new one. */
  valuesOf: (item: TItem) => TValues;
  empty: TValues;
  /**
   * The shared schema the server parses (or one derived from its fields), so a field error in
   * the browser says what the server would. It runs on the values as they are; the request
   * sends them untouched and the server normalises them as it always has.
   */
  schema: z.ZodType;
  /** The bodies of the create and save requests, or the first reason they cannot be sent yet. */
  toCreate: (values: TValues) => TCreate | string;
  toPatch: (values: TValues, version: number | undefined, item: TItem) => TPatch | string;
  create: UseMutationResult<{ id: number }, Error, TCreate>;
  save: UseMutationResult<TItem, Error, TPatch>;
  workflow: UseMutationResult<WorkflowResult, Error, WorkflowInput>;
  /** The item's own words for a step done, over `STEP_DONE`. */
  done?: Partial<Record<WorkflowAction, string>>;
  /** The project's zone, for the time a schedule answers with. */
  zone: string;
  /** A new item was saved: its editor page takes over. */
  onCreated: (id: number) => void;
  /** A newer version was taken in (a restore, or someone else's save) while nothing was unsaved. */
  onTakeIn?: (item: TItem) => void;
}

/**
 * The draft of an update or a photo story: the values in react-hook-form, checked with the
 * shared schema; saving (creating the item first), the 409 of a stale save, the field errors
 * the server names, a refused workflow step and its problems; Ctrl+S and the warning on leaving
 * with unsaved changes. The editor keeps only its own fields; `frame` feeds `EditorShell`.
 */
export function usePublishingDraft<TItem extends PublishedItem, TValues extends FieldValues & { slug: string }, TCreate, TPatch>(o: PublishingDraftOptions<TItem, TValues, TCreate, TPatch>) {
  const { item } = o;
  const form = useForm<TValues>({
    // Raw: the requests carry what the writer typed, as before the form ran the schema.
    resolver: zodResolver(o.schema as never, undefined, { raw: true }) as unknown as Resolver<TValues>,
    defaultValues: (item ? o.valuesOf(item) : o.empty) as DefaultValues<TValues>,
  });
  const [dirty, setDirty] = useState(false);
  // Bumped whenever the values are replaced wholesale, so uncontrolled parts (the rich-text editor) start again.
  const [generation, setGeneration] = useState(0);
  const [serverErrors, setServerErrors] = useState<Record<string, string>>({});
  const [conflict, setConflict] = useState<TItem | null>(null);
  const [refusal, setRefusal] = useState<{ message: string; problems: PublishingProblem[] } | null>(null);
  const [dialog, setDialog] = useState<"schedule" | "return" | null>(null);
  // The version the values were read from: a save sends it, and a newer one is taken in only when nothing is unsaved.
  const seenVersion = useRef(item?.version);
  const values = form.watch();

  // The editor's callbacks change identity every render; the effects below read the latest ones.
  const latest = useRef(o);
  latest.current = o;
  const replaceWith = useCallback(
    (next: TItem) => {
      seenVersion.current = next.version;
      form.reset(latest.current.valuesOf(next));
      setGeneration((g) => g + 1);
      latest.current.onTakeIn?.(next);
    },
    [form],
  );

  useEffect(() => {
    // Only a newer version: after "load theirs" the cached item can still be the older one.
    if (item && (item.version ?? 0) > (seenVersion.current ?? 0) && !dirty) replaceWith(item);
  }, [item, dirty, replaceWith]);

  useEffect(() => {
    if (!dirty) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener("beforeunload", warn);
    return () => window.removeEventListener("beforeunload", warn);
  }, [dirty]);

  /** Sets one field as the writer changed it; after a first save attempt the schema checks as they type. */
  const change = <K extends Path<TValues>>(name: K, value: PathValue<TValues, K>) => {
    form.setValue(name, value, { shouldValidate: form.formState.isSubmitted });
    setDirty(true);
  };

  const failedSave = (e: unknown) => {
    const current = conflictOf<TItem>(e);
    if (current) {
      setConflict(current);
      return;
    }
    if (e instanceof ApiError && Object.keys(e.fields).length) {
      setServerErrors(e.fields);
      toast.error("Some fields need attention before it can be saved.");
      return;
    }
    toast.error(e instanceof Error ? e.message : "Not saved.");
  };

  const send = async (v: TValues): Promise<boolean> => {
    try {
      if (!item) {
        const input = o.toCreate(v);
        if (typeof input === "string") {
          toast.error(input);
          return false;
        }
        const made = await o.create.mutateAsync(input);
        setDirty(false);
        toast.success("Saved as a draft");
        o.onCreated(made.id);
        return true;
      }
      const patch = o.toPatch(v, seenVersion.current, item);
      if (typeof patch === "string") {
        toast.error(patch);
        return false;
      }
      const saved = await o.save.mutateAsync(patch);
      seenVersion.current = saved.version;
      setDirty(false);
      setRefusal(null);
      form.setValue("slug" as Path<TValues>, saved.slug as PathValue<TValues, Path<TValues>>);
      toast.success("Saved");
      return true;
    } catch (e) {
      failedSave(e);
      return false;
    }
  };

  /** Saves (a new revision); answers whether it worked. */
  const save = async (): Promise<boolean> => {
    setServerErrors({});
    let ok = false;
    await form.handleSubmit(
      async (v) => {
        ok = await send(v);
      },
      () => {
        toast.error("Some fields need attention before it can be saved.");
      },
    )();
    return ok;
  };

  // Ctrl+S (Cmd+S) saves, as writers expect; the listener calls whatever save is current.
  const saveRef = useRef(save);
  saveRef.current = save;
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if ((e.ctrlKey || e.metaKey) && e.key.toLowerCase() === "s") {
        e.preventDefault();
        void saveRef.current();
      }
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, []);

  /** Takes a workflow step, saving unsaved changes first. */
  const step = async (input: WorkflowInput) => {
    if (dirty && !(await save())) return;
    setRefusal(null);
    setServerErrors({});
    try {
      const r = await o.workflow.mutateAsync(input);
      setDialog(null);
      toast.success(r.status === "scheduled" && r.scheduledFor ? `Scheduled for ${formatInstant(r.scheduledFor, o.zone)}` : { ...STEP_DONE, ...o.done }[input.action]);
    } catch (e) {
      const found = publishingProblemsOf(e);
      if (found) {
        setDialog(null);
        setRefusal({ message: e instanceof Error ? e.message : "It cannot be published yet.", problems: found });
      } else if (e instanceof ApiError && Object.keys(e.fields).length) {
        setServerErrors(e.fields);
      } else if (e instanceof ApiError && input.action === "schedule" && e.status < 500) {
        // A time in the past, or one the project's clock skips: said in the dialog.
        setServerErrors({ at: e.message });
      } else {
        toast.error(e instanceof Error ? e.message : "That step did not go through.");
      }
    }
  };

  const errors: Record<string, string | undefined> = { ...serverErrors };
  for (const [name, err] of Object.entries(form.formState.errors)) {
    const message = (err as { message?: unknown } | undefined)?.message;
    if (typeof message === "string") errors[name] = message;
  }

  const frame: EditorFrame = {
    saving: o.create.isPending || o.save.isPending,
    dirty,
    onSave: () => void save(),
    conflict: conflict !== null,
    onLoadTheirs: () => {
      if (!conflict) return;
      replaceWith(conflict);
      setDirty(false);
      setConflict(null);
    },
    refusal,
    busyAction: o.workflow.isPending ? (o.workflow.variables?.action ?? null) : null,
    onAction: (a) => {
      if (a === "schedule" || a === "return") {
        setServerErrors({});
        setDialog(a);
      } else void step({ action: a });
    },
    dialog,
    onCloseDialog: () => setDialog(null),
    onSchedule: (at) => void step({ action: "schedule", at }),
    onReturn: (comment) => void step({ action: "return", comment }),
    errors,
  };

  return { form, values, change, dirty, setDirty, generation, errors, refusal, setRefusal, save, step, frame };
}
