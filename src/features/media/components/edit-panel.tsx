import { zodResolver } from "@hookform/resolvers/zod";
import { useQuery } from "@tanstack/react-query";
import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { Controller, useForm } from "react-hook-form";
import { toast } from "sonner";
import type { z } from "zod";
import { MediaPatchInputSchema, SensitivitySchema, type MediaItem, type MediaPatchInput, type MediaVocabulary } from "#shared/schemas/media.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { facilityChoiceLabel } from "../../../lib/facility-tags.ts";
import { applyFieldErrors, SYSTEM_WORD } from "../../../lib/format.ts";
import { useMe } from "../../../lib/session.ts";
import { canReview, mediaFacilityTagsQueryOptions, mediaItemQueryOptions, useRetry, useUpdateMedia } from "../api.ts";
import { formatBytes, formatTakenAt, SENSITIVITY_WORD } from "../words.ts";
import { FocalPicker } from "./focal-picker.tsx";
import { MissingAlt, SecurityFlag, SensitivityWord, StatusWord } from "./marks.tsx";

type FormInput = z.input<typeof MediaPatchInputSchema>;

function defaultsOf(item: MediaItem): FormInput {
  return {
    altText: item.altText ?? "",
    caption: item.caption ?? "",
    credit: item.credit ?? "",
    focal: item.focal,
    tags: { areas: item.tags.areas, systems: item.tags.systems, milestones: item.tags.milestones, blocks: item.tags.blocks, plants: item.tags.plants },
    sensitivity: item.sensitivity,
  };
}

/** Areas as removable chips with a field to add one. */
function AreaTags({ value, onChange, known }: { value: string[]; onChange: (v: string[]) => void; known: string[] }) {
  const [draft, setDraft] = useState("");
  const id = useId();
  const add = () => {
    const v = draft.trim();
    if (v && !value.includes(v)) onChange([...value, v]);
    setDraft("");
  };
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium">
        Areas
      </label>
      <ul className="flex flex-wrap gap-1" aria-label="Areas of this photo">
        {value.map((a) => (
          <li key={a} className="inline-flex items-center gap-1 border border-rule-strong bg-paper px-2 py-0.5 text-sm">
            {a}
            <button type="button" className="px-1 text-ink-soft hover:text-bad" onClick={() => onChange(value.filter((x) => x !== a))} aria-label={`Remove area ${a}`}>
              ×
            </button>
          </li>
        ))}
        {value.length === 0 ? <li className="text-sm text-ink-faint">None yet</li> : null}
      </ul>
      <div className="flex gap-2">
        <input
          id={id}
          list={`${id}-known`}
          value={draft}
          maxLength={100}
          onChange={(e) => setDraft(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === "Enter") {
              e.preventDefault();
              add();
            }
          }}
          className="min-w-0 flex-1 rounded-sm border border-rule-strong bg-sheet px-3 py-2"
          placeholder="e.g. Plant yard"
        />
        <datalist id={`${id}-known`}>
          {known.map((a) => (
            <option key={a} value={a} />
          ))}
        </datalist>
        <Button size="sm" onClick={add} disabled={draft.trim() === ""}>
          Add area
        </Button>
      </div>
    </div>
  );
}

/** A group of tags under its name. */
function TagSet({ legend, children }: { legend: string; children: ReactNode }) {
  return (
    <fieldset className="flex flex-col gap-1">
      <legend className="text-sm font-medium">{legend}</legend>
      {children}
    </fieldset>
  );
}

/** Tags chosen by ticking: each box puts its key in `value` or takes it out. `multiline` tops the box for labels that wrap. */
function Ticks<K extends string | number>({ options, value, onChange, multiline = false }: { options: readonly { key: K; label: string }[]; value: readonly K[]; onChange: (v: K[]) => void; multiline?: boolean }) {
  return options.map(({ key, label }) => {
    const on = value.includes(key);
    return (
      <label key={key} className={`inline-flex ${multiline ? "items-start" : "items-center"} gap-1.5 text-sm`}>
        <input type="checkbox" className={multiline ? "mt-1" : undefined} checked={on} onChange={() => onChange(on ? value.filter((x) => x !== key) : [...value, key])} />
        {label}
      </label>
    );
  });
}

function EditForm({ item, slug, vocabulary, onClose }: { item: MediaItem; slug: string; vocabulary: MediaVocabulary; onClose: () => void }) {
  const me = useMe();
  const reviewer = canReview(me.data);
  const update = useUpdateMedia(slug);
  const facility = useQuery(mediaFacilityTagsQueryOptions(slug));
  const form = useForm<FormInput, unknown, MediaPatchInput>({ resolver: zodResolver(MediaPatchInputSchema), defaultValues: defaultsOf(item) });
  const { errors } = form.formState;

  // A fresh copy from the server (after saving, or when processing ends) replaces the form's values.
  useEffect(() => form.reset(defaultsOf(item)), [item.id, item.updatedAt, item.status]);

  const onSubmit = form.handleSubmit(async (values) => {
    const patch: MediaPatchInput = { ...values };
    // Sensitivity is a lead's decision: sent only by a lead or an admin, and only when changed.
    if (!reviewer || values.sensitivity === item.sensitivity) delete patch.sensitivity;
    try {
      await update.mutateAsync({ id: item.id, patch });
      toast.success("Photo saved");
    } catch (e) {
      if (e instanceof ApiError && Object.keys(e.fields).length) applyFieldErrors(e.fields, form.setError);
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label={`Edit ${item.name}`}>
      <Controller control={form.control} name="focal" render={({ field }) => <FocalPicker item={item} focal={field.value ?? item.focal} onChange={field.onChange} />} />
      {errors.focal ? <p role="alert" className="text-sm text-bad">{errors.focal.message ?? "Check the focal point."}</p> : null}
      <TextAreaField label="Alt text" rows={3} hint="What the photo shows, for people who cannot see it. Needed before it is published." error={errors.altText?.message} {...form.register("altText")} />
      <TextAreaField label="Caption" rows={2} error={errors.caption?.message} {...form.register("caption")} />
      <TextField label="Credit" error={errors.credit?.message} {...form.register("credit")} />
      <Controller control={form.control} name="tags.areas" render={({ field }) => <AreaTags value={field.value ?? []} onChange={field.onChange} known={vocabulary.areas} />} />
      <Controller
        control={form.control}
        name="tags.systems"
        render={({ field }) => (
          <TagSet legend="Systems">
            <div className="flex flex-wrap gap-x-4 gap-y-1">
              <Ticks options={vocabulary.systems.map((s) => ({ key: s, label: SYSTEM_WORD[s] }))} value={field.value ?? []} onChange={field.onChange} />
            </div>
            <p className="text-xs text-ink-faint">Tagging security sends the photo to a lead's review before it can be published.</p>
          </TagSet>
        )}
      />
      <Controller
        control={form.control}
        name="tags.milestones"
        render={({ field }) => (
          <TagSet legend="Milestones">
            {vocabulary.milestones.length === 0 ? <p className="text-sm text-ink-faint">The project has no milestones yet.</p> : null}
            <div className="flex max-h-40 flex-col gap-0.5 overflow-y-auto border border-rule p-2">
              <Ticks options={vocabulary.milestones.map((m) => ({ key: m.id, label: m.name }))} value={field.value ?? []} onChange={field.onChange} multiline />
            </div>
            {errors.tags?.milestones ? <p role="alert" className="text-sm text-bad">{errors.tags.milestones.message}</p> : null}
          </TagSet>
        )}
      />
      {(
        [
          ["tags.blocks", "Block", "blocks", "The project has no capacity blocks yet."],
          ["tags.plants", "Plant system", "plants", "The project has no plant systems yet."],
        ] as const
      ).map(([name, legend, key, none]) => (
        <Controller
          key={name}
          control={form.control}
          name={name}
          render={({ field }) => (
            <TagSet legend={legend}>
              {facility.data && facility.data[key].length === 0 ? <p className="text-sm text-ink-faint">{none}</p> : null}
              <div className="flex flex-wrap gap-x-4 gap-y-1">
                <Ticks options={(facility.data?.[key] ?? []).map((c) => ({ key: c.id, label: facilityChoiceLabel(c) }))} value={field.value ?? []} onChange={field.onChange} />
              </div>
              {errors.tags?.[key] ? <p role="alert" className="text-sm text-bad">{errors.tags[key]?.message}</p> : null}
            </TagSet>
          )}
        />
      ))}
      <p className="text-xs text-ink-faint">An internal block or system may tag a restricted photo only.</p>
      {reviewer ? (
        <SelectField
          label="Sensitivity"
          options={SensitivitySchema.options.map((s) => ({ value: s, label: `${SENSITIVITY_WORD[s].glyph} ${SENSITIVITY_WORD[s].word}` }))}
          error={errors.sensitivity?.message}
          {...form.register("sensitivity")}
        />
      ) : (
        <p className="text-sm">
          Sensitivity: <SensitivityWord sensitivity={item.sensitivity} /> <span className="text-ink-faint">(a project lead decides)</span>
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" variant="primary" busy={update.isPending}>
          Save photo
        </Button>
        <Button onClick={onClose}>Close</Button>
      </div>
    </form>
  );
}

/**
 * The edit panel beside the grid: the photo's facts, its focal point, words and tags. It opens
 * at once on the copy the grid already holds (`shown`), and takes the server's own copy when it
 * arrives; a photo that cannot be read says so here, and the library stays.
 */
export function EditPanel({ shown, slug, vocabulary, onClose }: { shown: MediaItem; slug: string; vocabulary: MediaVocabulary; onClose: () => void }) {
  const item = useQuery({ ...mediaItemQueryOptions(shown.id), placeholderData: shown });
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => heading.current?.focus(), [shown.id]);
  return (
    <aside aria-labelledby="media-edit-h" className="flex flex-col gap-3 border border-ink bg-sheet p-4" onKeyDown={(e) => e.key === "Escape" && onClose()}>
      <h2 id="media-edit-h" ref={heading} tabIndex={-1} className="break-all text-lg font-semibold outline-none">
        {item.data?.name ?? shown.name}
      </h2>
      {item.isError ? <Notice tone="error">{item.error.message}</Notice> : <EditPanelBody item={item.data ?? shown} slug={slug} vocabulary={vocabulary} onClose={onClose} />}
    </aside>
  );
}

function EditPanelBody({ item, slug, vocabulary, onClose }: { item: MediaItem; slug: string; vocabulary: MediaVocabulary; onClose: () => void }) {
  const retry = useRetry(slug);
  return (
    <>
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5 text-sm">
        <dt className="text-ink-faint">State</dt>
        <dd className="flex flex-wrap gap-2">
          <StatusWord status={item.status} />
          <SensitivityWord sensitivity={item.sensitivity} />
          {item.flaggedForReview ? <SecurityFlag /> : null}
          {!item.altText ? <MissingAlt /> : null}
        </dd>
        <dt className="text-ink-faint">Taken</dt>
        <dd>{formatTakenAt(item.takenAt)}</dd>
        <dt className="text-ink-faint">Size</dt>
        <dd className="tabular">
          {item.width} × {item.height} px · {formatBytes(item.bytes)}
        </dd>
        <dt className="text-ink-faint">Location data</dt>
        <dd>{item.hadGps ? "The original carried GPS; it is stripped from everything published." : "None in the original."}</dd>
        {item.reviewedBy ? (
          <>
            <dt className="text-ink-faint">Reviewed by</dt>
            <dd>{item.reviewedBy}</dd>
          </>
        ) : null}
      </dl>
      <p className="text-sm">
        <a href={item.originalUrl} className="underline underline-offset-4" target="_blank" rel="noreferrer">
          Open the original
        </a>{" "}
        <span className="text-ink-faint">(staff only; it keeps its metadata)</span>
      </p>
      {item.status === "failed" ? (
        <Notice tone="error" title="Processing failed">
          {item.failureReason}{" "}
          <Button size="sm" onClick={() => retry.mutate(item.id)} busy={retry.isPending}>
            Try again
          </Button>
        </Notice>
      ) : null}
      <EditForm item={item} slug={slug} vocabulary={vocabulary} onClose={onClose} />
    </>
  );
}
