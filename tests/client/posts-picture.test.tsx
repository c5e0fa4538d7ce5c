import { fireEvent, render, waitFor } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { Picture, srcSetOf, type PictureData } from "../../src/components/ui/picture.tsx";

// Our own example: a 2400 × 1600 photo with the media pipeline's widths in each format,
// listed out of order to show the markup sorts them.
const widths = [1600, 320, 2400, 640, 1024];
const variants = (format: "avif" | "webp" | "jpeg") => widths.map((w) => ({ url: `/media/v/h${w}-${w}w.${format === "jpeg" ? "jpg" : format}`, width: w, height: Math.round((w * 2) / 3), format }));
const photo: PictureData = {
  id: 42,
  width: 2400,
  height: 1600,
  altText: "Three chillers on their plinths in the plant yard",
  placeholder: "data:image/webp;base64,UklGRg==",
  dominantColor: "#8a9099",
  focal: { x: 0.25, y: 0.75 },
  sources: { avif: variants("avif"), webp: variants("webp"), jpeg: variants("jpeg") },
};

describe("Picture", () => {
  it("offers AVIF, then WebP, as <source>s, with a JPEG <img> fallback, each with srcset narrowest first and the same sizes", () => {
    const { container } = render(<Picture picture={photo} sizes="(min-width: 768px) 720px, 100vw" />);
    const sources = [...container.querySelectorAll("picture > source")];
    expect(sources.map((s) => s.getAttribute("type"))).toEqual(["image/avif", "image/webp"]);
    expect(sources[0]!.getAttribute("srcset")).toBe("/media/v/h320-320w.avif 320w, /media/v/h640-640w.avif 640w, /media/v/h1024-1024w.avif 1024w, /media/v/h1600-1600w.avif 1600w, /media/v/h2400-2400w.avif 2400w");
    expect(sources[1]!.getAttribute("srcset")).toMatch(/^\/media\/v\/h320-320w\.webp 320w, .* \/media\/v\/h2400-2400w\.webp 2400w$/);
    for (const s of sources) expect(s.getAttribute("sizes")).toBe("(min-width: 768px) 720px, 100vw");
    const img = container.querySelector("picture > img")!;
    // The <img> must be the last child of <picture>, after every <source>.
    expect(container.querySelector("picture")!.lastElementChild).toBe(img);
    expect(img.getAttribute("srcset")).toMatch(/^\/media\/v\/h320-320w\.jpg 320w, .*2400w$/);
    expect(img.getAttribute("sizes")).toBe("(min-width: 768px) 720px, 100vw");
    expect(img.getAttribute("src")).toBe("/media/v/h1024-1024w.jpg");
  });

  it("sets the intrinsic width and height (so nothing shifts), loads lazily below the fold and paints the placeholder until loaded", async () => {
    const { container } = render(<Picture picture={photo} sizes="100vw" />);
    const img = container.querySelector("img")!;
    expect(img.getAttribute("width")).toBe("2400");
    expect(img.getAttribute("height")).toBe("1600");
    expect(img.getAttribute("loading")).toBe("lazy");
    expect(img.getAttribute("decoding")).toBe("async");
    expect(img.getAttribute("alt")).toBe("Three chillers on their plinths in the plant yard");
    expect(img.style.backgroundColor).toBe("rgb(138, 144, 153)");
    expect(img.style.backgroundImage).toContain("data:image/webp;base64,UklGRg==");
    fireEvent.load(img);
    await waitFor(() => expect(img.style.backgroundImage).toBe(""));
    expect(img.style.backgroundColor).toBe("");
  });

  it("loads a hero at once with high priority, takes an alt override, and crops around the focal point when covering a box", () => {
    const { container } = render(<Picture picture={photo} sizes="100vw" eager alt="" fit="cover" aspect={21 / 9} />);
    const img = container.querySelector("img")!;
    expect(img.getAttribute("loading")).toBe("eager");
    expect(img.getAttribute("fetchpriority")).toBe("high");
    expect(img.getAttribute("alt")).toBe("");
    expect(img.style.objectPosition).toBe("25.0% 75.0%");
    expect(img.className).toContain("object-cover");
    expect(Number(img.style.aspectRatio)).toBeCloseTo(21 / 9, 5);
  });

  it("leaves out a format that has no derivatives yet, and falls back to WebP for src when there is no JPEG", () => {
    const { container } = render(<Picture picture={{ ...photo, sources: { avif: [], webp: variants("webp"), jpeg: [] } }} sizes="50vw" />);
    expect([...container.querySelectorAll("source")].map((s) => s.getAttribute("type"))).toEqual(["image/webp"]);
    const img = container.querySelector("img")!;
    expect(img.getAttribute("src")).toBe("/media/v/h1024-1024w.webp");
    expect(img.hasAttribute("srcset")).toBe(false);
  });
});

describe("srcSetOf", () => {
  it("lists each width once, narrowest first", () => {
    expect(srcSetOf([...variants("webp"), { url: "/dup.webp", width: 640, height: 427, format: "webp" }])).toBe(
      "/media/v/h320-320w.webp 320w, /media/v/h640-640w.webp 640w, /media/v/h1024-1024w.webp 1024w, /media/v/h1600-1600w.webp 1600w, /media/v/h2400-2400w.webp 2400w",
    );
  });
});
