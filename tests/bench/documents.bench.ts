/**
 * Benchmark of stamping a document for one reader (server/documents/documents.stamp.ts): a
 * 100-page PDF of about 20 MB (a photograph-like image and a few lines of text on each page),
 * stamped as an investor's download is. A plain script, not a test:
 *   npx tsx tests/bench/documents.bench.ts
 * Target: ≤ 1.5 s per copy and ≤ 300 MB peak memory (resident set of the process that stamps).
 *
 * The PDF is made first and written to a temporary file; the stamping runs in a child process
 * of its own, so its peak memory is the stamping's and not the making's.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { availableParallelism, cpus, tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { PDFDocument, StandardFonts } from "pdf-lib";
import sharp from "sharp";
import { stampForReader } from "../../server/documents/documents.stamp.ts";

const PAGES = 100;
const TARGET_BYTES = 20 * 1024 * 1024;
const RUNS = 5;
const READER = { name: "Elena Marsh", email: "investor@harbourfund.example", organisation: "Harbour Fund (invented)", madeAt: "5 December 2026, 14:03 GMT" };

/** A deterministic grainy picture: grain keeps JPEG from shrinking it to nothing. */
async function picture(seed: number, width: number, height: number): Promise<Buffer> {
  const raw = Buffer.alloc(width * height * 3);
  let s = seed >>> 0;
  for (let i = 0; i < raw.length; i += 3) {
    s = (Math.imul(s, 1_664_525) + 1_013_904_223) >>> 0;
    const x = (i / 3) % width;
    const y = Math.floor(i / 3 / width);
    const grain = s >>> 26;
    raw[i] = (x * 255) / width + grain;
    raw[i + 1] = (y * 255) / height + grain;
    raw[i + 2] = ((seed * 37) % 200) + grain;
  }
  return sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
}

async function makeInput(): Promise<Buffer> {
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  // Ten pictures, each embedded afresh on its pages: a hundred image streams, as a scanned report has.
  const side = 640;
  let pictures = await Promise.all(Array.from({ length: 10 }, (_, i) => picture(i + 1, side, side)));
  const perPage = TARGET_BYTES / PAGES;
  const scale = Math.sqrt(perPage / pictures[0]!.length);
  if (Math.abs(scale - 1) > 0.05) {
    const s = Math.round(side * scale);
    pictures = await Promise.all(Array.from({ length: 10 }, (_, i) => picture(i + 1, s, s)));
  }
  for (let p = 0; p < PAGES; p += 1) {
    const page = doc.addPage([595, 842]);
    const image = await doc.embedJpg(pictures[p % pictures.length]!);
    page.drawImage(image, { x: 48, y: 300, width: 499, height: 499 });
    page.drawText(`Aldermere Campus Phase 2 · monthly monitoring report (invented) · page ${p + 1}`, { x: 48, y: 260, size: 11, font });
    page.drawText("Hall 2A: containment complete; chiller 3 delivered; L3 commissioning started.", { x: 48, y: 240, size: 10, font });
  }
  return Buffer.from(await doc.save({ useObjectStreams: false }));
}

async function stampRuns(file: string): Promise<void> {
  const input = readFileSync(file);
  const seconds: number[] = [];
  let pages = 0;
  for (let i = 0; i < RUNS; i += 1) {
    const t = performance.now();
    const out = await stampForReader(input, "pdf", READER);
    seconds.push((performance.now() - t) / 1000);
    if (i === 0) pages = (await PDFDocument.load(out, { updateMetadata: false })).getPageCount();
  }
  const peakMb = process.resourceUsage().maxRSS / 1024;
  process.stdout.write(JSON.stringify({ seconds, peakMb, pages }));
}

const self = fileURLToPath(import.meta.url);
if (process.argv[2] === "--stamp") {
  await stampRuns(process.argv[3]!);
} else {
  const dir = mkdtempSync(path.join(tmpdir(), "plumbline-bench-documents-"));
  try {
    const t = performance.now();
    const input = await makeInput();
    const file = path.join(dir, "report.pdf");
    writeFileSync(file, input);
    console.log(`Stamping benchmark — ${cpus()[0]?.model ?? "cpu"} × ${availableParallelism()}, Node ${process.version}`);
    console.log(`Input: ${PAGES} pages, ${(input.length / (1024 * 1024)).toFixed(1)} MB (made in ${((performance.now() - t) / 1000).toFixed(1)} s)`);
    const child = spawnSync(process.execPath, ["--import", "tsx", self, "--stamp", file], { encoding: "utf8", maxBuffer: 1024 * 1024 });
    if (child.status !== 0) throw new Error(`the stamping process failed: ${child.stderr}`);
    const r = JSON.parse(child.stdout) as { seconds: number[]; peakMb: number; pages: number };
    const sorted = [...r.seconds].sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)]!;
    console.log(`Stamped copy: ${r.pages} pages; first copy ${r.seconds[0]!.toFixed(2)} s, median of ${RUNS} ${median.toFixed(2)} s (target ≤ 1.5 s)`);
    console.log(`Peak memory of the stamping process: ${r.peakMb.toFixed(0)} MB resident (target ≤ 300 MB)`);
    if (median > 1.5 || r.peakMb > 300) console.log("!! Over target.");
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
