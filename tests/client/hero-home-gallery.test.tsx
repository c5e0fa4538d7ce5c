import { fireEvent, render, screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import type { MediaPicture } from "../../src/shared/schemas/media.ts";
import type { MilestoneSnapshot, PostMilestone } from "../../src/shared/schemas/posts.ts";
import type { HomeBuild } from "../../src/shared/schemas/project-hero.ts";
import { HeroImage } from "../../src/features/projects/components/hero-image.tsx";
import { focusOfTap, HeroPicker } from "../../src/features/projects/components/hero-picker.tsx";
import { HomePage } from "../../src/features/projects/routes.tsx";
import { projectKeys } from "../../src/features/projects/api.ts";
import { GalleryThumb } from "../../src/features/public-site/components/gallery-thumb.tsx";
import { MilestonesThenNow, milestoneIdsInBody } from "../../src/features/public-site/components/milestone-then-now.tsx";
import { PostBody } from "../../src/features/public-site/components/post-body.tsx";
import { thenNowOf, ThenNowBar } from "../../src/features/public-site/components/then-now-bar.tsx";
import { renderWithApp } from "./render.tsx";

// Our own examples, in the shape of the demo (Aldermere Phase 2): a 2400 × 1600 illustration of Hall 2A.
const variants = (format: "avif" | "webp" | "jpeg") => [320, 640, 1024].map((w) => ({ url: `/media/v/h${w}-${w}w.${format === "jpeg" ? "jpg" : format}`, width: w, height: Math.round((w * 2) / 3), format }));
const photo = (over: Partial<MediaPicture> = {}): MediaPicture => ({
  id: 7,
  width: 2400,
  height: 1600,
  altText: "Hall 2A with its containment rows in place",
  caption: "Hall 2A containment rows",
  credit: null,
  placeholder: null,
  dominantColor: "#8a9099",
  takenAt: "2027-02-12T10:15:00",
  focal: { x: 0.5, y: 0.5 },
  isIllustration: true,
  sources: { avif: variants("avif"), webp: variants("webp"), jpeg: variants("jpeg") },
  ...over,
});

const snap = (over: Partial<MilestoneSnapshot>): MilestoneSnapshot => ({ status: "on_programme", baselineFinish: "2027-03-01", forecastFinish: "2027-03-01", actualFinish: null, percentComplete: 40, ...over });
const linked = (over: Partial<PostMilestone>): PostMilestone => ({ id: 11, name: "HD-1 containment complete", then: snap({}), now: snap({}), changed: false, ...over });

describe("the hero's focal point", () => {
  it("crops the hero around the chosen point: the image's object-position is the focus, not the photo's own", () => {
    const { container } = render(<HeroImage picture={photo({ focal: { x: 0.5, y: 0.5 } })} focus={{ x: 0.25, y: 0.8 }} frame="project" sizes="100vw" />);
    const img = container.querySelector("img")!;
    expect(img.style.objectPosition).toBe("25.0% 80.0%");
    expect(img.className).toContain("object-cover");
    // The box is the frame's, 4:3 on a phone and 21:9 from 640 px, so nothing below it moves.
    expect(screen.getByTestId("hero-image").className).toContain("aspect-[4/3]");
    expect(screen.getByTestId("hero-image").className).toContain("sm:aspect-[21/9]");
  });

  it("turns a tap on the photo into fractions of its width and height, kept within 0..1", () => {
    const rect = { left: 100, top: 50, width: 400, height: 200 };
    expect(focusOfTap(rect, 200, 200)).toEqual({ x: 0.25, y: 0.75 });
    expect(focusOfTap(rect, 90, 300)).toEqual({ x: 0, y: 1 });
  });

  it("moves the focal point with the arrow keys, and the previews follow", () => {
    const hero = { picture: photo(), focus: { x: 0.5, y: 0.5 }, mediaId: 7, version: 3 };
    renderWithApp(<HeroPicker slug="aldermere-phase-2" hero={hero} choices={[photo()]} canChoose />);
    const target = screen.getByTestId("hero-focus-target");
    fireEvent.keyDown(target, { key: "ArrowRight" });
    fireEvent.keyDown(target, { key: "ArrowUp" });
    expect(screen.getByTestId("hero-focus-mark").style.left).toBe("55%");
    expect(screen.getByTestId("hero-focus-mark").style.top).toBe("45%");
    const previews = screen.getAllByTestId("hero-preview");
    expect(previews.map((p) => p.querySelector("img")!.style.objectPosition)).toEqual(["55.0% 45.0%", "55.0% 45.0%"]);
    expect(previews.map((p) => p.textContent)).toEqual(["On a phone (4:3)", "On a desktop (21:9)"]);
  });

  it("shows marketing the choice without the buttons", () => {
    const hero = { picture: photo(), focus: { x: 0.5, y: 0.5 }, mediaId: 7, version: 3 };
    renderWithApp(<HeroPicker slug="aldermere-phase-2" hero={hero} choices={[photo()]} canChoose={false} />);
    expect(screen.queryByRole("button", { name: "Use as the hero" })).toBeNull();
    expect(screen.getByText("A project lead or an administrator chooses the hero photograph.")).toBeTruthy();
  });
});

describe("the home page", () => {
  const build = (over: Partial<HomeBuild>): HomeBuild => ({
    slug: "aldermere-phase-2",
    name: "Aldermere Campus, Phase 2",
    operatorName: "Kestrel Colocation",
    locationLabel: "Aldermere",
    description: "Two halls and a high-density suite.",
    picture: photo(),
    pictureIs: "hero",
    focus: { x: 0.3, y: 0.6 },
    percentComplete: 56.4,
    nextReady: { blockName: "Hall 2A", date: "2027-04-16" },
    ...over,
  });

  it("with one build, shows its hero at the chosen focus, the one figure and the next ready-for-service date in en-GB", () => {
    renderWithApp(<HomePage />, { data: [[projectKeys.home(), { builds: [build({})] }]] });
    expect(screen.getByTestId("home-figure").textContent).toBe("56%complete, across the whole programme");
    expect(screen.getByTestId("home-next-ready").textContent).toBe("Next ready for service: Hall 2A, forecast 16 April 2027");
    expect(screen.getByTestId("hero-image").querySelector("img")!.style.objectPosition).toBe("30.0% 60.0%");
    expect(screen.getByRole("link", { name: "Follow this build →" }).getAttribute("href")).toBe("/projects/aldermere-phase-2");
  });

  it("with several builds, lists each with its picture and figure", () => {
    renderWithApp(<HomePage />, { data: [[projectKeys.home(), { builds: [build({}), build({ slug: "aldermere-phase-3", name: "Aldermere Campus, Phase 3", picture: null, pictureIs: null, percentComplete: 4, nextReady: null })] }]] });
    const cards = screen.getAllByTestId("home-build");
    expect(cards).toHaveLength(2);
    expect(cards.map((c) => within(c).getByTestId("home-figure").textContent)).toEqual(["56%complete, across the whole programme", "4%complete, across the whole programme"]);
    expect(cards[0]!.querySelector("img")).not.toBeNull();
    expect(cards[1]!.querySelector("img")).toBeNull();
  });
});

describe("the then-and-now bar", () => {
  it("measures the move from the date at publication to the date now, in calendar days", () => {
    // Our own example: forecast 1 Mar 2027 when published, 15 Mar 2027 now.
    const later = thenNowOf(linked({ now: snap({ forecastFinish: "2027-03-15", status: "at_risk" }), changed: true }));
    expect(later.shiftDays).toBe(14);
    expect(later.words).toBe("Forecast 15 March 2027, 14 days later than the forecast date when published (1 March 2027).");
    expect(later.nowAt!).toBeGreaterThan(later.thenAt!);
    const earlier = thenNowOf(linked({ now: snap({ actualFinish: "2027-02-27", status: "complete" }), changed: true }));
    expect(earlier.shiftDays).toBe(-2);
    expect(earlier.words).toBe("Finished 27 February 2027, 2 days earlier than the forecast date when published (1 March 2027).");
    expect(thenNowOf(linked({})).words).toBe("Forecast 1 March 2027, the same date as when published.");
    expect(thenNowOf(linked({ now: null })).words).toBe("When published: forecast 1 March 2027. No longer published.");
  });

  it("draws the move as an ink bar from the then tick to the now tick, for the eye only, with the status in word and shape", () => {
    render(<ThenNowBar milestone={linked({ now: snap({ forecastFinish: "2027-03-15", status: "at_risk", percentComplete: 55 }), changed: true })} publishedOn="20 Feb 2027" />);
    const bar = screen.getByTestId("then-now-bar");
    expect(bar.getAttribute("aria-hidden")).toBe("true");
    const then = parseFloat(screen.getByTestId("then-mark").style.left);
    const now = parseFloat(screen.getByTestId("now-mark").style.left);
    const move = screen.getByTestId("then-now-move");
    expect(parseFloat(move.style.left)).toBeCloseTo(then, 5);
    expect(parseFloat(move.style.width)).toBeCloseTo(now - then, 5);
    expect(screen.getByText("At risk")).toBeTruthy();
    expect(screen.getByTestId("post-milestone").querySelector('[data-status="at_risk"] svg')).not.toBeNull();
    expect(screen.getByText("40% complete when published (20 Feb 2027), 55% now.")).toBeTruthy();
  });

  it("shows each linked milestone once: in the body where the body names it, the rest after the body", () => {
    const html = `<p>The containment is up.</p><aside class="milestone-block" data-milestone-id="11"><p class="milestone-name">HD-1 containment complete</p></aside><p>More next week.</p>`;
    const milestones = [linked({}), linked({ id: 12, name: "Hall 2A energised" })];
    expect([...milestoneIdsInBody(html)]).toEqual([11]);
    render(
      <>
        <PostBody html={html} images={[]} milestones={milestones} publishedOn="20 Feb 2027" />
        <MilestonesThenNow milestones={milestones} publishedOn="20 Feb 2027" inBody={milestoneIdsInBody(html)} />
      </>,
    );
    const shown = screen.getAllByTestId("post-milestone").map((m) => m.getAttribute("data-milestone-id"));
    expect(shown).toEqual(["11", "12"]);
    expect(screen.getByTestId("post-body").querySelector("aside.milestone-block")).toBeNull();
    expect(within(screen.getByTestId("post-body")).getByText("HD-1 containment complete")).toBeTruthy();
  });
});

describe("a gallery thumbnail", () => {
  it("keeps the whole photo at its own ratio (the illustration mark is never cropped), with its caption and date under it", () => {
    const onOpen = () => undefined;
    const { container } = render(<GalleryThumb photo={{ ...photo({ width: 1600, height: 1200 }), month: "2027-02" }} onOpen={onOpen} />);
    const img = container.querySelector("img")!;
    expect(Number(img.style.aspectRatio)).toBeCloseTo(1600 / 1200, 5);
    expect(screen.getByTestId("gallery-caption").textContent).toBe("Hall 2A containment rows");
    expect(screen.getByTestId("gallery-date").textContent).toBe("12 February 2027 · Illustration");
  });
});
