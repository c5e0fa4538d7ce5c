/**
 * Image derivative benchmark: the whole derivative set of a 24-megapixel JPEG made by
 * Plumbline's pipeline and by ImageMagick's best one-decode pipeline, side by side.
 *
 *   npx tsx tests/bench/images.bench.ts [--runs 3] [--keep]
 *
 * Prints wall times (median of the runs), their ratio, the bytes of each set, the SSIM of
 * every output against a reference downscale and the peak resident memory of each process.
 * Then the same photo tagged EXIF orientation 6 (how phones store a portrait), timed against
 * the same picture stored upright and against the landscape photo. A benchmark, not a test: it asserts nothing and never fails on a missed
 * target; it says which targets were met (issue 14: a rotated photo at most 1.2× the time of
 * an unrotated one, peak RSS ≤ 400 MB, bytes at most ImageMagick's at equal SSIM output by output).
 *
 * ImageMagick runs two ways, each one decode: with a JPEG size hint (libjpeg's scaled
 * decode, its fastest way; measured here the 2400 px outputs then lose detail, SSIM about
 * 0.93 before any encoding, and grow) and decoding at full size (its best quality). Speed is
 * compared with the faster, bytes and SSIM with the better. Then, since total bytes mean
 * little unless the SSIM matches, each of Plumbline's encoders is searched, output by
 * output, for the lowest quality that reaches ImageMagick's SSIM on that output, giving the
 * bytes ratio at equal SSIM.
 */
import { execFileSync, spawn } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { availableParallelism, cpus, tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import sharp, { type Sharp } from "sharp";
import { ssim } from "ssim.js";
import { DEFAULT_FORMATS, DEFAULT_WIDTHS, ENCODER_SETTINGS, makeDerivatives, planWidths } from "../../server/media/media.pipeline.ts";
import { makePatternedImage } from "../helpers/images.ts";

const THIS_FILE = fileURLToPath(import.meta.url);
const WIDTH = 6000;
const HEIGHT = 4000;

/**
 * ImageMagick's settings: common web settings (AVIF 60 on libheif's scale, WebP 80 at
 * libwebp's default method 4, JPEG 82 progressive 4:2:0 with libjpeg-turbo). ImageMagick 6
 * has no AVIF speed control, so libheif's default encoder speed is used.
 */
const MAGICK_SETTINGS = {
  avif: ["-quality", "60"],
  webp: ["-quality", "80", "-define", "webp:method=4"],
  jpeg: ["-quality", "82", "-sampling-factor", "4:2:0", "-interlace", "Plane"],
} as const;
const MAGICK_EXT = { avif: "avif", webp: "webp", jpeg: "jpg" } as const;

type Format = (typeof DEFAULT_FORMATS)[number];

interface Measured {
  wallMs: number;
  peakRssKb: number | null;
  stdout: string;
  stderr: string;
}

// ---------------------------------------------------------------------------------------
// Child mode: run Plumbline's pipeline alone in a fresh process, so its peak RSS is its own.
// ---------------------------------------------------------------------------------------
async function runChild(input: string, outDir: string): Promise<void> {
  const started = performance.now();
  const result = await makeDerivatives(input);
  const pipelineMs = performance.now() - started;
  mkdirSync(outDir, { recursive: true });
  for (const v of result.variants) writeFileSync(path.join(outDir, `${v.width}x${v.height}.${MAGICK_EXT[v.format]}`), v.buffer);
  process.stdout.write(`${JSON.stringify({ pipelineMs, variants: result.variants.length, placeholderBytes: result.placeholder.length })}\n`);
}

/** Runs a command, measuring its wall time and peak RSS (GNU time, else /proc VmHWM). */
async function runMeasured(command: string, args: string[]): Promise<Measured> {
  const useTime = existsSync("/usr/bin/time");
  const [cmd, argv] = useTime ? ["/usr/bin/time", ["-v", command, ...args]] : [command, args];
  const started = performance.now();
  const child = spawn(cmd, argv, { stdio: ["ignore", "pipe", "pipe"] });
  let stdout = "";
  let stderr = "";
  child.stdout.on("data", (chunk: Buffer) => (stdout += chunk.toString()));
  child.stderr.on("data", (chunk: Buffer) => (stderr += chunk.toString()));
  let polledKb = null as number | null;
  const poll = useTime
    ? null
    : setInterval(() => {
        try {
          const status = readFileSync(`/proc/${child.pid}/status`, "utf8");
          const hwm = /VmHWM:\s+(\d+) kB/.exec(status);
          if (hwm) polledKb = Math.max(polledKb ?? 0, Number(hwm[1]));
        } catch {
          // the process has just exited; the last reading stands
        }
      }, 10);
  const code: number = await new Promise((resolve, reject) => {
    child.on("error", reject);
    child.on("close", (exitCode) => resolve(exitCode ?? 1));
  });
  const wallMs = performance.now() - started;
  if (poll) clearInterval(poll);
  if (code !== 0) throw new Error(`${command} exited with ${code}:\n${stderr}`);
  let peakRssKb: number | null = polledKb;
  if (useTime) {
    const match = /Maximum resident set size \(kbytes\): (\d+)/.exec(stderr);
    peakRssKb = match ? Number(match[1]) : null;
  }
  return { wallMs, peakRssKb, stdout, stderr };
}

function heightFor(width: number): number {
  return Math.max(1, Math.round((width * HEIGHT) / WIDTH));
}

/**
 * One convert that decodes once and writes everything: the JPEG is read with a size hint
 * (libjpeg DCT scaling, as sharp's shrink-on-load), auto-oriented, converted to sRGB and
 * stripped, then resized down a chain (each width from the previous one, in memory),
 * writing every format at each step.
 */
function magickArgs(input: string, outDir: string, widths: number[], formats: readonly Format[], sizeHint: boolean): string[] {
  const largest = widths[0] ?? WIDTH;
  const hint = sizeHint ? ["-define", `jpeg:size=${largest}x${heightFor(largest)}`] : [];
  const args = [...hint, input, "-auto-orient", "-colorspace", "sRGB", "-strip", "-filter", "Lanczos"];
  for (const w of widths) {
    if (w !== WIDTH) args.push("-resize", `${w}x${heightFor(w)}!`);
    for (const format of formats) {
      args.push(...MAGICK_SETTINGS[format], "-write", path.join(outDir, `${w}x${heightFor(w)}.${MAGICK_EXT[format]}`));
    }
  }
  args.push("null:");
  return args;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? (sorted[mid] as number) : ((sorted[mid - 1] as number) + (sorted[mid] as number)) / 2;
}

interface Scored {
  file: string;
  format: Format;
  width: number;
  height: number;
  bytes: number;
  ssim: number;
}

/**
 * SSIM (ssim.js, Weber's fast variant, on luma, without its automatic downsampling so that
 * compression detail counts) of each output against a Lanczos-3 downscale of the fully
 * decoded original at the same size.
 */
async function scoreSet(dir: string, input: string, references: Map<string, Buffer>): Promise<Scored[]> {
  const scored: Scored[] = [];
  for (const file of readdirSync(dir).sort()) {
    const match = /^(\d+)x(\d+)\.(avif|webp|jpg)$/.exec(file);
    if (!match) continue;
    const width = Number(match[1]);
    const height = Number(match[2]);
    const format: Format = match[3] === "jpg" ? "jpeg" : (match[3] as Format);
    const bytes = readFileSync(path.join(dir, file));
    const key = `${width}x${height}`;
    let reference = references.get(key);
    if (!reference) {
      // From the fully decoded pixels: resizing a raw buffer cannot use shrink-on-load.
      const original = await decodeOriginal(input);
      reference = await sharp(original.data, { raw: original.info })
        .resize(width, height, { fit: "fill", kernel: "lanczos3" })
        .ensureAlpha()
        .raw()
        .toBuffer();
      references.set(key, reference);
    }
    const value = await ssimOf(bytes, width, height, reference);
    scored.push({ file, format, width, height, bytes: bytes.length, ssim: value });
  }
  return scored;
}

/** SSIM of encoded bytes against a reference of the same size (RGBA raw). */
async function ssimOf(bytes: Buffer, width: number, height: number, reference: Buffer): Promise<number> {
  const decoded = await sharp(bytes).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  if (decoded.info.width !== width || decoded.info.height !== height) {
    throw new Error(`an output of ${width}x${height} decodes to ${decoded.info.width}x${decoded.info.height}`);
  }
  return ssim(
    { data: new Uint8ClampedArray(decoded.data.buffer, decoded.data.byteOffset, decoded.data.length), width, height },
    { data: new Uint8ClampedArray(reference.buffer, reference.byteOffset, reference.length), width, height },
    { ssim: "weber", downsample: false },
  ).mssim;
}

let decodedOriginal: Promise<{ data: Buffer; info: { width: number; height: number; channels: 3 } }> | undefined;

/** The original at full resolution, oriented and in sRGB, decoded once for all references. */
function decodeOriginal(input: string) {
  decodedOriginal ??= sharp(input)
    .rotate()
    .toColourspace("srgb")
    .removeAlpha()
    .raw()
    .toBuffer({ resolveWithObject: true })
    .then(({ data, info }) => ({ data, info: { width: info.width, height: info.height, channels: 3 as const } }));
  return decodedOriginal;
}

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;
const mb = (kbytes: number | null) => (kbytes === null ? "n/a" : `${(kbytes / 1024).toFixed(0)} MB`);

const MAGICK_BIN = existsSync("/usr/bin/convert") ? "/usr/bin/convert" : "convert";

/** How one ImageMagick pipeline is run: with libjpeg's scaled decode, or at full size. */
const MAGICK_WAYS = [
  { key: "hinted", label: "ImageMagick, size-hinted decode (fastest)", sizeHint: true },
  { key: "full", label: "ImageMagick, full decode (best quality)", sizeHint: false },
] as const;

/**
 * The bytes of Plumbline's encoders at ImageMagick's SSIM, output by output: for each
 * output, the lowest quality (binary search, 20–100) whose SSIM reaches that of
 * ImageMagick's output at the same width and format, with the other settings as configured.
 */
async function matchAtEqualSsim(input: string, widths: number[], theirs: Scored[], references: Map<string, Buffer>): Promise<{ output: Scored; quality: number | null; bytes: number | null }[]> {
  // The levels the pipeline encodes: the largest width from the file (shrink-on-load), each
  // smaller one from the one before, in memory.
  const levels = new Map<number, { data: Buffer; info: { width: number; height: number; channels: 3 } }>();
  let previous: { data: Buffer; info: { width: number; height: number; channels: 3 } } | null = null;
  for (const w of widths) {
    const source: Sharp = previous ? sharp(previous.data, { raw: previous.info }) : sharp(input).rotate().toColourspace("srgb").removeAlpha();
    const { data, info } = await source.resize(w, heightFor(w), { fit: "fill" }).raw().toBuffer({ resolveWithObject: true });
    previous = { data, info: { width: info.width, height: info.height, channels: 3 } };
    levels.set(w, previous);
  }
  const rows: { output: Scored; quality: number | null; bytes: number | null }[] = [];
  for (const target of theirs) {
    const level = levels.get(target.width);
    if (!level) continue;
    const reference = references.get(`${target.width}x${target.height}`) as Buffer;
    let lo = 20;
    let hi = 100;
    let best: { quality: number; bytes: number } | null = null;
    while (lo <= hi) {
      const quality = Math.floor((lo + hi) / 2);
      const image = sharp(level.data, { raw: level.info });
      const settings = { ...ENCODER_SETTINGS[target.format], quality };
      const bytes = await (target.format === "avif" ? image.avif(settings) : target.format === "webp" ? image.webp(settings) : image.jpeg(settings)).toBuffer();
      const value = await ssimOf(bytes, target.width, target.height, reference);
      if (value >= target.ssim) {
        best = { quality, bytes: bytes.length };
        hi = quality - 1;
      } else lo = quality + 1;
    }
    rows.push({ output: target, quality: best?.quality ?? null, bytes: best?.bytes ?? null });
  }
  return rows;
}

async function main(): Promise<void> {
  const argv = process.argv.slice(2);
  if (argv[0] === "--child") {
    await runChild(argv[1] as string, argv[2] as string);
    return;
  }
  const runsIndex = argv.indexOf("--runs");
  const runs = runsIndex >= 0 ? Math.max(1, Number(argv[runsIndex + 1])) : 3;
  const keep = argv.includes("--keep");

  const work = mkdtempSync(path.join(tmpdir(), "plumbline-image-bench-"));
  try {
    console.log(`Image derivative benchmark — ${cpus()[0]?.model ?? "cpu"} × ${availableParallelism()}, Node ${process.version}, sharp ${sharp.versions.sharp} (libvips ${sharp.versions.vips})`);
    let magickVersion = "not found";
    let magickFormats = "";
    try {
      magickVersion = execFileSync(MAGICK_BIN, ["-version"], { encoding: "utf8" }).split("\n")[0] ?? "";
      magickFormats = execFileSync(MAGICK_BIN, ["-list", "format"], { encoding: "utf8" });
    } catch {
      console.log("ImageMagick's convert is not installed (apt-get install imagemagick); only Plumbline's pipeline can be measured.");
    }
    console.log(`ImageMagick: ${magickVersion}`);
    const magickHas = (name: string) => new RegExp(`^\\s*${name}\\*?\\s+\\S+\\s+rw`, "mi").test(magickFormats);
    const formatsForMagick = DEFAULT_FORMATS.filter((f) => magickHas(f === "jpeg" ? "JPEG" : f.toUpperCase()));
    for (const f of DEFAULT_FORMATS) {
      if (!formatsForMagick.includes(f)) console.log(`!! This ImageMagick cannot write ${f.toUpperCase()}; the comparison leaves ${f} out of its set.`);
    }

    const input = path.join(work, "site-24mp.jpg");
    let t = performance.now();
    writeFileSync(input, await makePatternedImage({ width: WIDTH, height: HEIGHT, noise: 6, texture: 14, format: "jpeg", quality: 92 }));
    console.log(`Input: ${WIDTH} × ${HEIGHT} JPEG (q92, generated: shapes, gradients, grain and texture), ${kb(readFileSync(input).length)}, made in ${((performance.now() - t) / 1000).toFixed(1)} s`);
    const widths = planWidths(WIDTH, DEFAULT_WIDTHS).reverse();
    console.log(`Set: widths ${widths.join(", ")} × ${DEFAULT_FORMATS.join(", ")}`);
    console.log(`Plumbline settings: ${JSON.stringify(ENCODER_SETTINGS)}`);
    console.log(`ImageMagick settings: ${JSON.stringify(MAGICK_SETTINGS)}\n`);

    const plumblineDir = path.join(work, "plumbline");
    const plumbline: Measured[] = [];
    const plumblinePipelineMs: number[] = [];
    const magick = new Map<string, Measured[]>(MAGICK_WAYS.map((w) => [w.key, []]));
    const magickDir = (key: string) => path.join(work, `magick-${key}`);
    for (const way of MAGICK_WAYS) mkdirSync(magickDir(way.key));
    for (let run = 0; run < runs; run += 1) {
      const p = await runMeasured(process.execPath, ["--import", "tsx", THIS_FILE, "--child", input, plumblineDir]);
      plumbline.push(p);
      plumblinePipelineMs.push((JSON.parse(p.stdout.trim().split("\n").pop() ?? "{}") as { pipelineMs: number }).pipelineMs);
      const line = [`run ${run + 1}: Plumbline ${(plumblinePipelineMs[run] as number).toFixed(0)} ms in the pipeline (${p.wallMs.toFixed(0)} ms as a whole process, Node start-up included)`];
      if (formatsForMagick.length > 0) {
        for (const way of MAGICK_WAYS) {
          const m = await runMeasured(MAGICK_BIN, magickArgs(input, magickDir(way.key), widths, formatsForMagick, way.sizeHint));
          magick.get(way.key)?.push(m);
          line.push(`ImageMagick ${way.key} ${m.wallMs.toFixed(0)} ms`);
        }
      }
      console.log(line.join(", "));
    }

    t = performance.now();
    const references = new Map<string, Buffer>();
    const ours = await scoreSet(plumblineDir, input, references);
    const theirs = new Map<string, Scored[]>();
    for (const way of MAGICK_WAYS) theirs.set(way.key, formatsForMagick.length > 0 ? await scoreSet(magickDir(way.key), input, references) : []);
    console.log(`(scored ${ours.length + [...theirs.values()].reduce((n, x) => n + x.length, 0)} outputs in ${((performance.now() - t) / 1000).toFixed(1)} s)\n`);

    const hinted = theirs.get("hinted") ?? [];
    const full = theirs.get("full") ?? [];
    const find = (set: Scored[], s: Scored) => set.find((o) => o.width === s.width && o.height === s.height && o.format === s.format);
    console.log("output            Plumbline bytes   SSIM  | IM hinted bytes   SSIM  | IM full bytes   SSIM");
    for (const s of ours) {
      const cell = (o: Scored | undefined) => `${(o ? kb(o.bytes) : "—").padStart(12)}   ${o ? o.ssim.toFixed(4) : "  —   "}`;
      console.log(`${`${s.width}x${s.height}.${s.format}`.padEnd(17)} ${cell(s)} | ${cell(find(hinted, s))} | ${cell(find(full, s))}`);
    }
    console.log("");
    const total = (set: Scored[]) => set.reduce((n, s) => n + s.bytes, 0);
    for (const format of DEFAULT_FORMATS) {
      const a = ours.filter((s) => s.format === format);
      const parts = [`${format.padEnd(5)} Plumbline ${kb(total(a))} (mean SSIM ${mean(a.map((s) => s.ssim)).toFixed(4)})`];
      for (const way of MAGICK_WAYS) {
        const b = (theirs.get(way.key) ?? []).filter((s) => s.format === format);
        if (b.length) parts.push(`IM ${way.key} ${kb(total(b))} (${mean(b.map((s) => s.ssim)).toFixed(4)}), ratio ${(total(a) / total(b)).toFixed(2)}×`);
      }
      console.log(parts.join("; "));
    }

    const comparable = ours.filter((s) => formatsForMagick.includes(s.format));
    const bytesOurs = total(comparable);
    const ssimOurs = mean(comparable.map((s) => s.ssim));
    const wallOurs = median(plumblinePipelineMs);
    const wallOursProcess = median(plumbline.map((m) => m.wallMs));
    const rssOurs = Math.max(...plumbline.map((m) => m.peakRssKb ?? 0)) || null;
    const wallOf = (key: string) => {
      const ms = magick.get(key) ?? [];
      return ms.length ? median(ms.map((m) => m.wallMs)) : NaN;
    };
    const rssOf = (key: string) => Math.max(...(magick.get(key) ?? []).map((m) => m.peakRssKb ?? 0)) || null;
    const fastestKey = wallOf("hinted") <= wallOf("full") ? "hinted" : "full";
    const wallFastest = wallOf(fastestKey);

    console.log("\nSummary (median of", runs, "runs)");
    console.log(`  wall time      Plumbline ${wallOurs.toFixed(0)} ms (pipeline; ${wallOursProcess.toFixed(0)} ms as a whole process)   IM hinted ${wallOf("hinted").toFixed(0)} ms   IM full ${wallOf("full").toFixed(0)} ms`);
    console.log(`  speed-up       against ImageMagick's faster way (${fastestKey}): ${(wallFastest / wallOurs).toFixed(2)}× (pipeline)   ${(wallFastest / wallOursProcess).toFixed(2)}× (whole processes)`);
    for (const way of MAGICK_WAYS) {
      const set = theirs.get(way.key) ?? [];
      if (!set.length) continue;
      const atLeast = comparable.filter((s) => {
        const o = find(set, s);
        return o !== undefined && s.ssim >= o.ssim;
      }).length;
      console.log(
        `  against IM ${way.key.padEnd(6)} bytes ${kb(bytesOurs)} vs ${kb(total(set))} = ${(bytesOurs / total(set)).toFixed(2)}×; mean SSIM ${ssimOurs.toFixed(4)} vs ${mean(set.map((s) => s.ssim)).toFixed(4)}; ` +
          `${atLeast} of ${comparable.length} outputs at equal or better SSIM; peak RSS ${mb(rssOf(way.key))}`,
      );
    }
    console.log(`  peak RSS       Plumbline ${mb(rssOurs)} (Node included)   (${existsSync("/usr/bin/time") ? "GNU time -v" : "/proc VmHWM polling"})`);

    // The fair bytes figure: Plumbline's encoders brought to ImageMagick's SSIM, output by output.
    let matchedRatio = NaN;
    const matchedByFormat: { format: Format; ratio: number }[] = [];
    if (full.length) {
      t = performance.now();
      const matched = await matchAtEqualSsim(input, widths, full, references);
      console.log(`\nAt equal SSIM, output by output (Plumbline's encoder settings, quality searched to reach IM full's SSIM; ${((performance.now() - t) / 1000).toFixed(0)} s):`);
      for (const format of formatsForMagick) {
        const rows = matched.filter((r) => r.output.format === format);
        const cells = rows.map((r) => `${r.output.width}: ${r.quality === null ? "never reached" : `q${r.quality} ${((r.bytes as number) / r.output.bytes).toFixed(2)}×`}`);
        const reached = rows.filter((r) => r.bytes !== null);
        const ratio = reached.reduce((n, r) => n + (r.bytes as number), 0) / reached.reduce((n, r) => n + r.output.bytes, 0);
        if (reached.length === rows.length) matchedByFormat.push({ format, ratio });
        console.log(`  ${format.padEnd(5)} ${ratio.toFixed(2)}× | ${cells.join(" | ")}`);
      }
      const reached = matched.filter((r) => r.bytes !== null);
      matchedRatio = reached.length === matched.length ? reached.reduce((n, r) => n + (r.bytes as number), 0) / reached.reduce((n, r) => n + r.output.bytes, 0) : NaN;
      console.log(`  whole set ${Number.isNaN(matchedRatio) ? "n/a (some outputs never reached IM's SSIM)" : `${matchedRatio.toFixed(2)}× the bytes of ImageMagick's full-decode set`}`);
    }

    // Phones store most portraits as landscape pixels plus EXIF orientation 6: the same photo,
    // turned upright in the pipeline. Its set is capped on the long side (1600 × 2400 at most),
    // so it should cost about what the landscape one does (decision 058).
    const portrait = path.join(work, "site-24mp-portrait.jpg");
    await sharp(input).withMetadata({ orientation: 6 }).jpeg({ quality: 92 }).toFile(portrait);
    // The same picture with its pixels stored upright (4000 × 6000, no orientation tag) and the
    // same metadata otherwise (sharp's withMetadata adds an sRGB profile to both, as phones
    // embed one): the same derivative set as the tagged photo, so the two differ only by the
    // turn. The landscape photo makes a different set (about 9 % fewer pixels) and carries no
    // profile, so against it the ratio also counts those.
    const upright = path.join(work, "site-24mp-upright.jpg");
    await sharp(input).rotate(90).withMetadata().jpeg({ quality: 92 }).toFile(upright);
    // Each tagged run is run beside an upright and a landscape one, so all meet the same load on
    // the machine; the ratios are of the medians.
    const portraitRuns: Measured[] = [];
    const portraitMs: number[] = [];
    const uprightMs: number[] = [];
    const pairedMs: number[] = [];
    const pipelineMsOf = (m: Measured) => (JSON.parse(m.stdout.trim().split("\n").pop() ?? "{}") as { pipelineMs: number }).pipelineMs;
    for (let run = 0; run < runs; run += 1) {
      pairedMs.push(pipelineMsOf(await runMeasured(process.execPath, ["--import", "tsx", THIS_FILE, "--child", input, path.join(work, "paired")])));
      uprightMs.push(pipelineMsOf(await runMeasured(process.execPath, ["--import", "tsx", THIS_FILE, "--child", upright, path.join(work, "upright")])));
      const r = await runMeasured(process.execPath, ["--import", "tsx", THIS_FILE, "--child", portrait, path.join(work, "portrait")]);
      portraitRuns.push(r);
      portraitMs.push(pipelineMsOf(r));
    }
    const portraitWall = median(portraitMs);
    const uprightWall = median(uprightMs);
    const pairedWall = median(pairedMs);
    const portraitRss = Math.max(...portraitRuns.map((m) => m.peakRssKb ?? 0)) || null;
    const portraitWidths = readdirSync(path.join(work, "portrait"))
      .filter((f) => f.endsWith(".jpg"))
      .map((f) => f.replace(/\.jpg$/, ""))
      .sort((a, b) => Number(a.split("x")[0]) - Number(b.split("x")[0]));
    console.log(`\n  portrait       the same photo tagged EXIF orientation 6 (4000 × 6000 displayed; set ${portraitWidths.join(", ")})`);
    console.log(`                 Plumbline ${portraitWall.toFixed(0)} ms against ${uprightWall.toFixed(0)} ms for the picture stored upright = ${(portraitWall / uprightWall).toFixed(2)}× (the cost of the turn)`);
    console.log(`                 and against ${pairedWall.toFixed(0)} ms for the landscape photo = ${(portraitWall / pairedWall).toFixed(2)}× (turn and the larger set); peak RSS ${mb(portraitRss)} against ${mb(rssOurs)}`);

    const verdict = (ok: boolean) => (ok ? "met" : "NOT met");
    const fullBytes = total(full);
    const fullSsim = mean(full.map((s) => s.ssim));
    console.log("\nTargets");
    console.log(`  ≥ 3× faster than ImageMagick's faster way:          ${verdict(wallFastest / wallOurs >= 3)} (${(wallFastest / wallOurs).toFixed(2)}× pipeline, ${(wallFastest / wallOursProcess).toFixed(2)}× whole process)`);
    console.log(
      `  total bytes ≤ 0.6× at equal or better SSIM (IM full): ${verdict(bytesOurs / fullBytes <= 0.6 && ssimOurs >= fullSsim)} ` +
        `(as made: ${(bytesOurs / fullBytes).toFixed(2)}× at mean SSIM ${ssimOurs.toFixed(4)} vs ${fullSsim.toFixed(4)}; at equal SSIM output by output: ${Number.isNaN(matchedRatio) ? "n/a" : `${matchedRatio.toFixed(2)}×`})`,
    );
    console.log(`  bytes ≤ IM full's at equal SSIM, output by output:   ${verdict(matchedByFormat.length > 0 && matchedByFormat.every((r) => r.ratio <= 1))} (${matchedByFormat.map((r) => `${r.format} ${r.ratio.toFixed(2)}×`).join(", ") || "n/a"})`);
    console.log(
      `  portrait (EXIF 6) ≤ 1.2× the time of untagged:        ${verdict(portraitWall / uprightWall <= 1.2)} against the picture stored upright (${portraitWall.toFixed(0)} ms against ${uprightWall.toFixed(0)} ms = ${(portraitWall / uprightWall).toFixed(2)}×); ` +
        `${verdict(portraitWall / pairedWall <= 1.2)} against the landscape photo (${(portraitWall / pairedWall).toFixed(2)}×)`,
    );
    console.log(`  peak RSS ≤ 400 MB:                                   ${verdict(rssOurs !== null && rssOurs <= 400 * 1024 && (portraitRss ?? Infinity) <= 400 * 1024)} (landscape ${mb(rssOurs)}, portrait ${mb(portraitRss)})`);
    if (keep) console.log(`\nOutputs kept in ${work}`);
  } finally {
    if (!keep) rmSync(work, { recursive: true, force: true });
  }
}

await main();
