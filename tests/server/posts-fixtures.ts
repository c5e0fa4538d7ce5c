import { randomBytes } from "node:crypto";
import sharp from "sharp";
import { afterAll, beforeAll } from "vitest";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import type { Audience } from "../../src/shared/schemas/common.ts";
import type { RichTextDoc, RichTextNode } from "../../src/shared/schemas/rich-text.ts";

/**
 * Rows for the posts, stories and site tests: each test makes its own project, photos and
 * milestones. Photos are inserted as processed library items with small real derivative files
 * (the media pipeline has its own tests), so the derivative URLs really answer.
 */

let seq = 0;
const unique = () => `${Date.now().toString(36)}${(seq++).toString(36)}${randomBytes(2).toString("hex")}`;

export async function createProject(t: TestApp, opts: { timeZone?: string } = {}): Promise<{ id: number; slug: string }> {
  const slug = `posts-${unique()}`;
  const [id] = await t.db("projects").insert({
    slug,
    name: `Test campus ${slug}`,
    operator_name: "Kestrel Colocation",
    time_zone: opts.timeZone ?? "Europe/London",
    description: "A test project.",
    currency: "GBP",
  });
  return { id: Number(id), slug };
}

export interface PhotoOptions {
  sensitivity?: "unreviewed" | "cleared" | "restricted";
  altText?: string | null;
  caption?: string | null;
  takenAt?: string | null;
  status?: "processing" | "ready" | "failed";
}

const WIDTHS = [320, 640, 1024] as const;
const EXT = { avif: "avif", webp: "webp", jpeg: "jpg" } as const;
let tinyJpeg: Buffer | null = null;

/** A processed photo in a project's library, with derivative rows and files. Returns its id and variant URLs. */
export async function createPhoto(t: TestApp, projectId: number, o: PhotoOptions = {}): Promise<{ id: number; urls: string[] }> {
  tinyJpeg ??= await sharp({ create: { width: 8, height: 6, channels: 3, background: "#8899aa" } }).jpeg().toBuffer();
  const [id] = await t.db("media_items").insert({
    project_id: projectId,
    sha256: randomBytes(32).toString("hex"),
    status: o.status ?? "ready",
    original_key: `originals/${randomBytes(8).toString("hex")}.jpg`,
    original_name: "test.jpg",
    mime: "image/jpeg",
    bytes: tinyJpeg.length,
    width: 2400,
    height: 1600,
    taken_at: o.takenAt === undefined ? "2026-03-02T10:15:00" : o.takenAt,
    taken_on: o.takenAt === undefined ? "2026-03-02" : o.takenAt ? o.takenAt.slice(0, 10) : null,
    alt_text: o.altText === undefined ? "Two chillers on their plinths" : o.altText,
    caption: o.caption === undefined ? null : o.caption,
    sensitivity: o.sensitivity ?? "cleared",
    dominant_color: "#8899aa",
  });
  const urls: string[] = [];
  if ((o.status ?? "ready") === "ready") {
    const hash = randomBytes(8).toString("hex");
    for (const format of ["avif", "webp", "jpeg"] as const) {
      for (const width of WIDTHS) {
        const name = `${hash}-${width}w.${EXT[format]}`;
        await t.db("media_variants").insert({ media_id: id, width, height: Math.round((width * 2) / 3), format, storage_key: `variants/${name}`, bytes: tinyJpeg.length });
        await t.plumbline.mediaStorage.put(`variants/${name}`, tinyJpeg);
        urls.push(`/media/v/${name}`);
      }
    }
  }
  return { id: Number(id), urls };
}

/** A milestone through the programme API (as the demo lead). */
export async function createMilestone(
  t: TestApp,
  projectSlug: string,
  o: { name?: string; audience?: Audience; baselineFinish?: string; forecastFinish?: string | null; percentComplete?: number } = {},
): Promise<{ id: number; name: string; version: number }> {
  const lead = await signIn(t, DEMO.lead);
  const name = o.name ?? `Chillers commissioned (L4) ${unique()}`;
  const res = await lead.agent
    .post(`/api/projects/${projectSlug}/milestones`)
    .set("X-CSRF-Token", lead.csrf)
    .send({
      name,
      phase: "Commissioning",
      system: "cooling",
      weight: 10,
      baselineFinish: o.baselineFinish ?? "2027-03-01",
      forecastFinish: o.forecastFinish ?? null,
      percentComplete: o.percentComplete ?? 40,
      audience: o.audience ?? "public",
    });
  if (res.status !== 201) throw new Error(`milestone not created: ${res.status} ${JSON.stringify(res.body)}`);
  return { id: res.body.id, name, version: res.body.version };
}

export const text = (s: string): RichTextNode => ({ type: "paragraph", content: [{ type: "text", text: s }] });
export const image = (mediaId: number, extra: Record<string, unknown> = {}): RichTextNode => ({ type: "image", attrs: { mediaId, ...extra } });
export const milestoneBlock = (milestoneId: number): RichTextNode => ({ type: "milestone", attrs: { milestoneId } });
export const doc = (...content: RichTextNode[]): RichTextDoc => ({ type: "doc", content });

/** A post body and fields that pass every publishing check, given a cleared cover. */
export function postInput(coverMediaId: number | null, over: Record<string, unknown> = {}) {
  return {
    title: `Chillers on their plinths ${unique()}`,
    summary: "All five chillers are set and piped.",
    body: doc(text("The five chillers arrived this month and are on their plinths.")),
    audience: "public",
    coverMediaId,
    ...over,
  };
}

export type Client = Awaited<ReturnType<typeof signIn>>;

export type EveryRole = Record<"admin" | "lead" | "marketing" | "investor", Client>;

/** Signs in each demo role once for a test file. */
export async function signInAll(t: TestApp): Promise<EveryRole> {
  const [admin, lead, marketing, investor] = await Promise.all([signIn(t, DEMO.admin), signIn(t, DEMO.lead), signIn(t, DEMO.marketing), signIn(t, DEMO.investor)]);
  return { admin, lead, marketing, investor };
}

/**
 * A test app for the file and a signed-in client of each demo role: started in beforeAll, closed
 * in afterAll. Read the fields inside hooks and tests (they are filled in beforeAll).
 */
export function useAppAsEveryRole(env: Record<string, string> = {}): { t: TestApp; as: EveryRole } {
  const f = {} as { t: TestApp; as: EveryRole };
  beforeAll(async () => {
    f.t = await startTestApp(env);
    f.as = await signInAll(f.t);
  });
  afterAll(async () => {
    await f.t?.close();
  });
  return f;
}

interface DomWindow {
  DOMParser: typeof DOMParser;
  document: Document;
  close(): void;
}
// jsdom (a general-purpose, standards-following DOM, used as the reference parser here) ships no
// type declarations in this install; the DOM lib's types describe what it returns.
const JSDOM_MODULE = "jsdom";
let jsdomWindow: DomWindow | null = null;
async function domWindow(): Promise<DomWindow> {
  if (!jsdomWindow) {
    const { JSDOM } = (await import(JSDOM_MODULE)) as { JSDOM: new (html: string) => { window: DomWindow } };
    jsdomWindow = new JSDOM("<!doctype html><html><body></body></html>").window;
  }
  return jsdomWindow;
}

/** Parses XML strictly; throws when it is not well-formed. */
export async function parseXml(text: string): Promise<Document> {
  const w = await domWindow();
  const xml = new w.DOMParser().parseFromString(text, "application/xml");
  const error = xml.getElementsByTagName("parsererror")[0];
  if (error) throw new Error(`not well-formed XML: ${error.textContent}`);
  return xml;
}

/** An HTML fragment as a detached element, for inspecting what a browser would build. */
export async function parseHtmlFragment(html: string): Promise<Element> {
  const w = await domWindow();
  const root = w.document.createElement("div");
  root.innerHTML = html;
  return root;
}
