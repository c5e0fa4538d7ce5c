import { getDocument, GlobalWorkerOptions, TextLayer, type PDFDocumentProxy } from "pdfjs-dist";
// The worker is bundled by Vite beside the app (same origin, no CDN); only this chunk refers to it.
import workerUrl from "pdfjs-dist/build/pdf.worker.min.mjs?url";
import { useEffect, useRef, useState } from "react";
import { Notice, Spinner } from "../../components/ui/sheet.tsx";
import { useElementWidth } from "../../lib/use-element-width.ts";
import "./investor-pdf-viewer.css";

GlobalWorkerOptions.workerSrc = workerUrl;

/** Pages drawn ahead of the one in view, so scrolling finds them ready. */
const AHEAD = "900px 0px";

type Size = { width: number; height: number };

/**
 * One page: a placeholder of the page's size until it nears the view, then the page drawn on a
 * canvas at the screen's pixel density, with its words in a text layer above (selectable, read
 * out by screen readers, searchable with the browser's find).
 */
function PdfPage({ doc, number, width, firstSize }: { doc: PDFDocumentProxy; number: number; width: number; firstSize: Size }) {
  const box = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const text = useRef<HTMLDivElement>(null);
  const [near, setNear] = useState(number === 1);
  const [size, setSize] = useState<Size>(firstSize);
  const [drawn, setDrawn] = useState(false);
  const scale = width / size.width;

  useEffect(() => {
    const el = box.current;
    if (!el || near || typeof IntersectionObserver === "undefined") return;
    const io = new IntersectionObserver((entries) => entries.some((e) => e.isIntersecting) && setNear(true), { rootMargin: AHEAD });
    io.observe(el);
    return () => io.disconnect();
  }, [near]);

  useEffect(() => {
    if (!near || width <= 0) return;
    let cancelled = false;
    let cancel = () => {};
    void (async () => {
      const page = await doc.getPage(number);
      if (cancelled) return;
      const base = page.getViewport({ scale: 1 });
      setSize({ width: base.width, height: base.height });
      const viewport = page.getViewport({ scale: width / base.width });
      const c = canvas.current;
      const layer = text.current;
      if (!c || !layer) return;
      const ratio = window.devicePixelRatio || 1;
      c.width = Math.floor(viewport.width * ratio);
      c.height = Math.floor(viewport.height * ratio);
      const task = page.render({ canvas: c, viewport, transform: ratio === 1 ? undefined : [ratio, 0, 0, ratio, 0, 0] });
      cancel = () => task.cancel();
      try {
        await task.promise;
      } catch {
        return; // cancelled by a newer width or by leaving the page
      }
      if (cancelled) return;
      layer.replaceChildren();
      await new TextLayer({ textContentSource: page.streamTextContent(), container: layer, viewport }).render();
      if (!cancelled) setDrawn(true);
    })();
    return () => {
      cancelled = true;
      cancel();
    };
  }, [doc, number, near, width]);

  return (
    <div
      ref={box}
      className="relative mx-auto border border-rule bg-white shadow-sm"
      style={{ width, height: size.height * scale, ["--total-scale-factor" as string]: scale }}
      data-testid="pdf-page"
      data-page={number}
      data-drawn={drawn ? "true" : "false"}
    >
      <canvas ref={canvas} aria-hidden className="block" style={{ width, height: size.height * scale }} />
      <div ref={text} className="pdf-text-layer" />
      {!drawn ? <span className="absolute left-2 top-2 text-xs text-ink-faint">Page {number}</span> : null}
    </div>
  );
}

/**
 * A PDF read in the page with pdf.js, from bytes already fetched (the reader's stamped copy): each
 * page drawn when it nears the view, at the width of the column.
 */
export function PdfViewer({ bytes, title }: { bytes: ArrayBuffer; title: string }) {
  const [ref, width] = useElementWidth<HTMLDivElement>();
  const [doc, setDoc] = useState<{ pdf: PDFDocumentProxy; first: Size } | null>(null);
  const [failed, setFailed] = useState<string | null>(null);

  useEffect(() => {
    // pdf.js hands the bytes to its worker, which takes them over: it gets a copy, and the cache keeps its own.
    const task = getDocument({ data: new Uint8Array(bytes.slice(0)), isEvalSupported: false, enableXfa: false });
    let live = true;
    task.promise.then(
      async (pdf) => {
        const first = (await pdf.getPage(1)).getViewport({ scale: 1 });
        if (live) setDoc({ pdf, first: { width: first.width, height: first.height } });
      },
      (e: unknown) => live && setFailed(e instanceof Error ? e.message : "The file could not be read."),
    );
    return () => {
      live = false;
      void task.destroy();
    };
  }, [bytes]);

  if (failed) return <Notice tone="error" title="This file could not be shown">{failed} Try the download instead.</Notice>;
  const pageWidth = Math.min(width, 900);
  return (
    <div ref={ref} className="w-full min-w-0" data-testid="pdf-viewer" aria-label={`${title}, as a document`} role="document">
      {!doc ? (
        <Spinner label="Opening the document" />
      ) : (
        <div className="flex flex-col gap-4 bg-paper py-2">
          <p className="text-sm text-ink-soft" data-testid="pdf-page-count">
            {doc.pdf.numPages} page{doc.pdf.numPages === 1 ? "" : "s"}
          </p>
          {pageWidth > 0
            ? Array.from({ length: doc.pdf.numPages }, (_, i) => <PdfPage key={i + 1} doc={doc.pdf} number={i + 1} width={pageWidth} firstSize={doc.first} />)
            : null}
        </div>
      )}
    </div>
  );
}
