import { useState, type KeyboardEvent, type MouseEvent } from "react";
import type { Focal, MediaPicture } from "#shared/schemas/media.ts";
import type { Hero } from "#shared/schemas/project-hero.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { Picture } from "../../../components/ui/picture.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { useSetHero } from "../api.ts";
import { HERO_FRAMES } from "./hero-image.tsx";

const clamp = (v: number) => Math.min(1, Math.max(0, Math.round(v * 1000) / 1000));

/** The focal point of a tap on the whole photo: fractions of its width and height from the top left. */
export function focusOfTap(rect: { left: number; top: number; width: number; height: number }, x: number, y: number): Focal {
  return { x: clamp((x - rect.left) / rect.width), y: clamp((y - rect.top) / rect.height) };
}

const STEP = 0.05;
const NUDGE: Record<string, [number, number]> = { ArrowLeft: [-STEP, 0], ArrowRight: [STEP, 0], ArrowUp: [0, -STEP], ArrowDown: [0, STEP] };

function CropPreview({ picture, focus, ratio, label }: { picture: MediaPicture; focus: Focal; ratio: number; label: string }) {
  return (
    <figure className="min-w-0" data-testid="hero-preview">
      <div className="overflow-hidden border border-rule" style={{ aspectRatio: String(ratio) }}>
        <Picture picture={{ ...picture, focal: focus }} fit="cover" aspect={ratio} sizes="20rem" className="h-full" alt="" />
      </div>
      <figcaption className="mt-1 text-sm text-ink-soft">{label}</figcaption>
    </figure>
  );
}

/**
 * Choosing the project's hero (decision 055): one of the cleared photos, then a tap on it where a
 * crop should centre (or the arrow keys), with the crop previewed as a phone and a desktop show it.
 * `canChoose`: leads and admins; others see the choice without the buttons.
 */
export function HeroPicker({ slug, hero, choices, canChoose }: { slug: string; hero: Hero; choices: readonly MediaPicture[]; canChoose: boolean }) {
  const [chosenId, setChosenId] = useState<number | null>(hero.mediaId);
  const [focus, setFocus] = useState<Focal>(hero.focus);
  const save = useSetHero(slug);
  const chosen = choices.find((c) => c.id === chosenId) ?? (hero.picture && hero.picture.id === chosenId ? hero.picture : null);
  const error = save.error instanceof ApiError ? save.error.message : save.error ? "The choice was not saved; try again." : null;

  const pick = (p: MediaPicture) => {
    setChosenId(p.id);
    // A new photo starts from its own focal point (set in the media library).
    if (p.id !== hero.mediaId) setFocus(p.focal);
    save.reset();
  };
  const onTap = (e: MouseEvent<HTMLButtonElement>) => {
    const img = e.currentTarget.querySelector("img");
    if (img) setFocus(focusOfTap(img.getBoundingClientRect(), e.clientX, e.clientY));
  };
  const onKey = (e: KeyboardEvent<HTMLButtonElement>) => {
    const step = NUDGE[e.key];
    if (!step) return;
    e.preventDefault();
    setFocus((f) => ({ x: clamp(f.x + step[0]), y: clamp(f.y + step[1]) }));
  };

  return (
    <div className="flex flex-col gap-6">
      {chosen ? (
        <section aria-labelledby="hero-focus" className="grid gap-4 lg:grid-cols-[3fr_2fr]">
          <div>
            <h2 id="hero-focus" className="font-semibold">
              Where the crop centres
            </h2>
            <p className="mt-1 text-sm text-ink-soft">Tap the photo on the part that must stay in view, or focus it and use the arrow keys.</p>
            <button
              type="button"
              className="relative mt-2 block w-full cursor-crosshair border border-rule bg-paper"
              onClick={onTap}
              onKeyDown={onKey}
              disabled={!canChoose}
              aria-label={`Focal point: ${Math.round(focus.x * 100)}% across, ${Math.round(focus.y * 100)}% down. Tap or use the arrow keys to move it.`}
              data-testid="hero-focus-target"
            >
              <Picture picture={chosen} sizes="(min-width: 1024px) 36rem, 100vw" alt="" />
              <span
                aria-hidden="true"
                className="pointer-events-none absolute size-6 -translate-x-1/2 -translate-y-1/2 rounded-full border-2 border-white outline outline-2 outline-ink"
                style={{ left: `${(focus.x * 100).toFixed(1)}%`, top: `${(focus.y * 100).toFixed(1)}%` }}
                data-testid="hero-focus-mark"
              />
            </button>
          </div>
          <div className="grid grid-cols-2 content-start gap-3 lg:grid-cols-1">
            <CropPreview picture={chosen} focus={focus} ratio={HERO_FRAMES.project.phone} label="On a phone (4:3)" />
            <CropPreview picture={chosen} focus={focus} ratio={HERO_FRAMES.project.desktop} label="On a desktop (21:9)" />
          </div>
        </section>
      ) : (
        <p className="text-ink-soft">No hero is chosen: the project page shows the newest public update's cover.</p>
      )}
      {canChoose ? (
        <div className="flex flex-wrap items-center gap-3">
          <Button variant="primary" busy={save.isPending} disabled={!chosen} onClick={() => chosen && save.mutate({ mediaId: chosen.id, focus, version: hero.version })}>
            Use as the hero
          </Button>
          {hero.mediaId !== null ? (
            <Button onClick={() => save.mutate({ mediaId: null, version: hero.version })} disabled={save.isPending}>
              Show the latest cover instead
            </Button>
          ) : null}
          {save.isSuccess ? (
            <p role="status" className="text-sm">
              Saved. The project page and the home page show it now.
            </p>
          ) : null}
        </div>
      ) : (
        <Notice>A project lead or an administrator chooses the hero photograph.</Notice>
      )}
      {error ? <Notice tone="error">{error}</Notice> : null}
      <section aria-labelledby="hero-choices">
        <h2 id="hero-choices" className="font-semibold">
          Cleared photos
        </h2>
        {choices.length === 0 ? (
          <p className="mt-1 text-ink-soft">No photo of this project is cleared with alt text yet. A lead clears photos in the review queue.</p>
        ) : (
          <ul className="mt-2 grid grid-cols-2 gap-2 sm:grid-cols-[repeat(auto-fill,minmax(10rem,1fr))]">
            {choices.map((p) => (
              <li key={p.id}>
                <button
                  type="button"
                  onClick={() => pick(p)}
                  aria-pressed={p.id === chosenId}
                  className={`block w-full border-2 ${p.id === chosenId ? "border-ink" : "border-transparent hover:border-rule-strong"}`}
                  data-testid="hero-choice"
                >
                  <Picture picture={p} fit="cover" aspect={4 / 3} sizes="10rem" alt={`Choose: ${p.altText ?? "photo"}`} />
                  {p.id === chosenId ? <span className="block bg-ink px-1 py-0.5 text-left text-xs font-semibold text-white">Chosen</span> : null}
                </button>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
