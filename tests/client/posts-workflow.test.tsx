import { fireEvent, render, screen, within } from "@testing-library/react";
import { describe, expect, it, vi } from "vitest";
import type { MediaPicture } from "../../src/shared/schemas/media.ts";
import { AudienceMark } from "../../src/components/ui/audience-mark.tsx";
import { Lightbox } from "../../src/components/ui/lightbox.tsx";
import { WorkflowActions } from "../../src/components/ui/workflow-actions.tsx";
import { PostBody, splitBody } from "../../src/features/public-site/components/post-body.tsx";

const names = () => within(screen.getByRole("group", { name: "Publishing" })).getAllByRole("button").map((b) => b.textContent);

describe("WorkflowActions", () => {
  it("offers marketing only “Submit for review” on a draft, and nothing on a post in review", () => {
    const { unmount } = render(<WorkflowActions status="draft" role="marketing" ownWork onAction={() => undefined} />);
    expect(names()).toEqual(["Submit for review"]);
    unmount();
    render(<WorkflowActions status="in_review" role="marketing" ownWork onAction={() => undefined} />);
    expect(screen.queryByRole("group", { name: "Publishing" })).toBeNull();
  });

  it("offers a lead approve and return on someone else's post in review, but not publish until approved", () => {
    const { unmount } = render(<WorkflowActions status="in_review" role="lead" ownWork={false} onAction={() => undefined} />);
    expect(names()).toEqual(["Approve", "Return with comments"]);
    unmount();
    render(<WorkflowActions status="approved" role="lead" ownWork={false} onAction={() => undefined} />);
    expect(names()).toEqual(["Publish", "Schedule…", "Return with comments"]);
  });

  it("lets a lead publish or schedule their own draft directly, and calls back with the step chosen", () => {
    const onAction = vi.fn();
    render(<WorkflowActions status="draft" role="lead" ownWork onAction={onAction} />);
    expect(names()).toEqual(["Submit for review", "Publish", "Schedule…"]);
    fireEvent.click(screen.getByRole("button", { name: "Schedule…" }));
    expect(onAction).toHaveBeenCalledWith("schedule");
  });

  it("names withdrawing a scheduled post for what it does, and offers only the steps a feature supports", () => {
    const { unmount } = render(<WorkflowActions status="scheduled" role="admin" ownWork={false} onAction={() => undefined} />);
    expect(names()).toContain("Cancel the schedule");
    unmount();
    render(<WorkflowActions status="approved" role="lead" ownWork={false} offered={["submit", "approve", "publish", "withdraw"]} onAction={() => undefined} />);
    expect(names()).toEqual(["Publish"]);
  });
});

describe("AudienceMark", () => {
  it("marks investor content by word and its own shape, and leaves public items unmarked on public lists", () => {
    const { container, unmount } = render(<AudienceMark audience="investor" hidePublic />);
    expect(container.textContent).toBe("For investors");
    expect(container.querySelector('svg[data-shape="investor"]')).not.toBeNull();
    unmount();
    const pub = render(<AudienceMark audience="public" hidePublic />);
    expect(pub.container.textContent).toBe("");
  });
});

const picture = (id: number): MediaPicture => ({
  id,
  width: 1600,
  height: 1067,
  altText: `Photo ${id}`,
  caption: `Library caption ${id}`,
  credit: null,
  placeholder: null,
  dominantColor: "#777777",
  takenAt: "2026-09-15T09:42:00+01:00",
  focal: { x: 0.5, y: 0.5 },
  isIllustration: true,
  sources: {
    avif: [{ url: `/media/v/a${id}-640w.avif`, width: 640, height: 427, format: "avif" }],
    webp: [{ url: `/media/v/w${id}-640w.webp`, width: 640, height: 427, format: "webp" }],
    jpeg: [{ url: `/media/v/j${id}-640w.jpg`, width: 640, height: 427, format: "jpeg" }],
  },
});

// The markup the server renders (server/posts/rich-text.ts): a figure naming the photo, a
// <picture> inside it, and a caption; a milestone block as an aside.
const html =
  '<p>The chillers arrived.</p><figure class="post-image" data-media-id="7"><picture><source type="image/avif" srcset="/media/v/a7-640w.avif 640w" /><img src="/media/v/j7-640w.jpg" alt="Five chillers" width="1600" height="1067" /></picture><figcaption>Chillers set. <span class="post-image-credit">Photo: demo</span></figcaption></figure>' +
  '<aside class="milestone-block" data-milestone-id="6"><p class="milestone-name">Chillers delivered and set</p></aside><p>More to come.</p>';

describe("PostBody", () => {
  it("keeps the server's text and milestone blocks, and turns each photo it names into a responsive picture with its caption", () => {
    const segments = splitBody(html, [picture(7)]);
    expect(segments.map((s) => s.kind)).toEqual(["html", "image", "html"]);
    const { container } = render(<PostBody html={html} images={[picture(7)]} />);
    const fig = container.querySelector('figure[data-media-id="7"]')!;
    expect([...fig.querySelectorAll("source")].map((s) => s.getAttribute("type"))).toEqual(["image/avif", "image/webp"]);
    const img = fig.querySelector("img")!;
    expect(img.getAttribute("loading")).toBe("lazy");
    // The post's own alt text (from the server's markup) wins over the library's.
    expect(img.getAttribute("alt")).toBe("Five chillers");
    expect(fig.querySelector("figcaption")!.textContent).toBe("Chillers set. Photo: demo");
    expect(container.querySelector('aside.milestone-block[data-milestone-id="6"]')!.textContent).toBe("Chillers delivered and set");
    expect(container.textContent).toContain("More to come.");
  });

  it("leaves a photo it has no picture for exactly as the server sent it", () => {
    const { container } = render(<PostBody html={html} images={[]} />);
    expect(container.querySelector("figure img")!.getAttribute("src")).toBe("/media/v/j7-640w.jpg");
    expect(container.querySelectorAll("source")).toHaveLength(1);
  });
});

describe("Lightbox", () => {
  it("steps with the arrow keys, closes with Escape and gives focus back to what opened it", () => {
    const items = [1, 2, 3].map((id) => ({ picture: picture(id), caption: `Caption ${id}` }));
    const opener = document.createElement("button");
    document.body.appendChild(opener);
    opener.focus();
    let index: number | null = 0;
    const onIndexChange = (i: number | null) => {
      index = i;
      rerender(<Lightbox items={items} index={index} onIndexChange={onIndexChange} />);
    };
    const { rerender } = render(<Lightbox items={items} index={index} onIndexChange={onIndexChange} />);
    const dialog = screen.getByRole("dialog");
    expect(dialog.getAttribute("aria-label")).toBe("Photo 1 of 3");
    expect(document.activeElement?.textContent).toContain("Close");
    fireEvent.keyDown(dialog, { key: "ArrowLeft" });
    expect(screen.getByRole("dialog").getAttribute("aria-label")).toBe("Photo 3 of 3");
    fireEvent.keyDown(screen.getByRole("dialog"), { key: "ArrowRight" });
    fireEvent.keyDown(screen.getByRole("dialog"), { key: "ArrowRight" });
    expect(screen.getByRole("dialog").getAttribute("aria-label")).toBe("Photo 2 of 3");
    expect(screen.getByText("Caption 2")).toBeTruthy();
    fireEvent.keyDown(screen.getByRole("dialog"), { key: "Escape" });
    expect(index).toBeNull();
    expect(screen.queryByRole("dialog")).toBeNull();
    expect(document.activeElement).toBe(opener);
    opener.remove();
  });
});
