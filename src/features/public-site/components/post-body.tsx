import { useMemo } from "react";
import { POST_PHOTO_SIZES } from "#shared/domain/picture-sizes.ts";
import type { MediaPicture, PostMilestone } from "#shared/schemas/posts.ts";
import { Picture } from "../../../components/ui/picture.tsx";
import { useInBrowser } from "../../../lib/use-in-browser.ts";
import { ThenNowBar } from "./then-now-bar.tsx";

/** Typography of a post body: the serif for reading, the interface face for captions. */
export const PROSE =
  "font-serif text-[1.075rem] leading-[1.7] text-ink [&_a]:text-ink [&_a]:underline [&_a]:underline-offset-4 [&_blockquote]:my-5 [&_blockquote]:border-l-4 [&_blockquote]:border-rule-strong [&_blockquote]:pl-4 [&_blockquote]:italic [&_figcaption]:mt-2 [&_figcaption]:font-sans [&_figcaption]:text-sm [&_figcaption]:text-ink-soft [&_figure]:my-6 [&_h2]:mt-8 [&_h2]:mb-2 [&_h2]:font-sans [&_h2]:text-2xl [&_h2]:font-semibold [&_h2]:tracking-tight [&_h3]:mt-6 [&_h3]:mb-2 [&_h3]:font-sans [&_h3]:text-xl [&_h3]:font-semibold [&_h4]:mt-5 [&_h4]:font-sans [&_h4]:font-semibold [&_hr]:my-8 [&_hr]:border-rule [&_li]:my-1 [&_ol]:my-4 [&_ol]:list-decimal [&_ol]:pl-6 [&_p]:my-4 [&_ul]:my-4 [&_ul]:list-disc [&_ul]:pl-6 [&_.milestone-block]:my-6 [&_.milestone-block]:border-l-4 [&_.milestone-block]:border-ink [&_.milestone-block]:bg-sheet [&_.milestone-block]:px-4 [&_.milestone-block]:py-3 [&_.milestone-block]:font-sans [&_.milestone-name]:my-0 [&_.milestone-name]:font-semibold [&_.milestone-figures]:my-1 [&_.milestone-figures]:text-sm [&_.milestone-figures]:text-ink-soft [&_.milestone-status]:font-medium [&_.status-complete]:text-ink [&_.status-on_programme]:text-good [&_.status-at_risk]:text-watch [&_.status-behind]:text-bad [&_.post-image-credit]:text-ink-faint";

type Segment =
  | { kind: "html"; html: string }
  | { kind: "image"; picture: MediaPicture; alt: string | null; captionHtml: string | null; key: string }
  | { kind: "milestone"; id: number; key: string };

/** The library photo an <img> of the server's HTML shows: by `data-media-id`, else by a derivative URL. */
function pictureOf(img: Element, byId: Map<number, MediaPicture>, byUrl: Map<string, MediaPicture>): MediaPicture | null {
  const id = Number(img.getAttribute("data-media-id") ?? img.closest("[data-media-id]")?.getAttribute("data-media-id"));
  if (Number.isInteger(id) && byId.has(id)) return byId.get(id) ?? null;
  const urls = [img.getAttribute("src"), ...(img.getAttribute("srcset") ?? "").split(",").map((s) => s.trim().split(/\s+/)[0])];
  for (const u of urls) {
    if (!u) continue;
    const path = u.replace(/^https?:\/\/[^/]+/, "");
    const hit = byUrl.get(path);
    if (hit) return hit;
  }
  return null;
}

/**
 * Splits the sanitised HTML into runs of markup and the photos in it, so each photo
 * becomes a responsive <Picture> (AVIF/WebP/JPEG, srcset, the placeholder while it
 * loads) while the text stays exactly as the server rendered it.
 */
export function splitBody(html: string, images: readonly MediaPicture[], milestoneIds: ReadonlySet<number> = new Set()): Segment[] {
  if (typeof DOMParser === "undefined") return [{ kind: "html", html }];
  const byId = new Map(images.map((p) => [p.id, p]));
  const byUrl = new Map<string, MediaPicture>();
  for (const p of images) for (const v of [...p.sources.avif, ...p.sources.webp, ...p.sources.jpeg]) byUrl.set(v.url.replace(/^https?:\/\/[^/]+/, ""), p);
  const doc = new DOMParser().parseFromString(`<body>${html}</body>`, "text/html");
  const out: Segment[] = [];
  let buffer = "";
  const flush = () => {
    if (buffer.trim()) out.push({ kind: "html", html: buffer });
    buffer = "";
  };
  doc.body.childNodes.forEach((node, i) => {
    if (node instanceof Element) {
      const img = node.tagName === "IMG" ? node : node.querySelector("img");
      // Only a block that is a photo (a figure, a picture or a bare image) is replaced; text around an inline image stays as sent.
      const isPhotoBlock = img && (node.tagName === "FIGURE" || node.tagName === "PICTURE" || node.tagName === "IMG" || (node.tagName === "P" && node.textContent?.trim() === ""));
      const picture = isPhotoBlock && img ? pictureOf(img, byId, byUrl) : null;
      // A milestone block of a linked milestone is drawn as its then-and-now bar, in place (decision 055).
      const milestoneId = node.tagName === "ASIDE" ? Number(node.getAttribute("data-milestone-id")) : NaN;
      if (milestoneIds.has(milestoneId)) {
        flush();
        out.push({ kind: "milestone", id: milestoneId, key: `milestone-${i}-${milestoneId}` });
        return;
      }
      if (picture && img) {
        flush();
        const caption = node.querySelector("figcaption");
        out.push({ kind: "image", picture, alt: img.getAttribute("alt"), captionHtml: caption ? caption.innerHTML : null, key: `img-${i}-${picture.id}` });
        return;
      }
      buffer += node.outerHTML;
    } else if (node.nodeType === Node.TEXT_NODE) {
      buffer += (node.textContent ?? "").replace(/&/g, "&amp;").replace(/</g, "&lt;");
    }
  });
  flush();
  return out;
}

/** A post body in the serif, photos responsive, each with its caption. */
export function PostBody({ html, images, milestones = [], publishedOn = null }: { html: string; images: readonly MediaPicture[]; milestones?: readonly PostMilestone[]; publishedOn?: string | null }) {
  const byId = useMemo(() => new Map(milestones.map((m) => [m.id, m])), [milestones]);
  // The server has no DOMParser: it sends the body as one run of its HTML, and the browser's
  // first render (the hydration) does the same before the photos become responsive pictures.
  const inBrowser = useInBrowser();
  const segments = useMemo<Segment[]>(() => (inBrowser ? splitBody(html, images, new Set(byId.keys())) : [{ kind: "html", html }]), [inBrowser, html, images, byId]);
  return (
    <div className={PROSE} data-testid="post-body">
      {segments.map((s, i) =>
        s.kind === "html" ? (
          // The server renders this from the editor's JSON and sanitises it with an allow-list.
          <div key={`html-${i}`} dangerouslySetInnerHTML={{ __html: s.html }} />
        ) : s.kind === "milestone" ? (
          <div key={s.key} className="my-6">
            <ThenNowBar milestone={byId.get(s.id)!} publishedOn={publishedOn} />
          </div>
        ) : (
          <figure key={s.key} data-media-id={s.picture.id}>
            <Picture picture={s.picture} alt={s.alt ?? undefined} sizes={POST_PHOTO_SIZES} />
            {s.captionHtml ? <figcaption dangerouslySetInnerHTML={{ __html: s.captionHtml }} /> : s.picture.caption ? <figcaption>{s.picture.caption}</figcaption> : null}
          </figure>
        ),
      )}
    </div>
  );
}
