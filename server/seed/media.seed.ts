import type { Knex } from "knex";
import { DateTime } from "luxon";
import { pino } from "pino";
import sharp from "sharp";
import type { MediaPatchInput } from "#shared/schemas/media.ts";
import type { System } from "#shared/schemas/programme.ts";
import type { Actor } from "../core/types.ts";
import { createMediaJobs } from "../media/media.jobs.ts";
import { createMediaService } from "../media/media.service.ts";
import { loadConfig, type Config } from "../config.ts";
import { createLocalDiskStorage, createUploadArea, testMediaDirFor } from "../media/media.storage.ts";
import { createMediaStorage } from "../media/media.storage-choice.ts";
import { createProgrammeService } from "../programme/programme.service.ts";
import { createProjectsService } from "../projects/projects.service.ts";
import { createAccountsService } from "../users/users.accounts.ts";

/**
 * Illustrative site photos for the demo project: drawings made here from SVG, each marked
 * "Illustration" in the picture and flagged `is_illustration`, run through the same probe and
 * derivative pipeline as an upload (synchronously, no worker needed), then tagged, captioned
 * and reviewed as the demo's marketing and lead users would. Capture times spread over the
 * nine months before the seed runs, like the programme's history.
 */

const W = 1600;
const H = 1067;
const TZ = "Europe/London";

/** mulberry32: repeatable detail in the drawings. */
function seeded(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const rect = (x: number, y: number, w: number, h: number, fill: string, extra = "") => `<rect x="${x}" y="${y}" width="${w}" height="${h}" fill="${fill}" ${extra}/>`;
const line = (x1: number, y1: number, x2: number, y2: number, stroke: string, width: number, extra = "") =>
  `<line x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}" stroke="${stroke}" stroke-width="${width}" ${extra}/>`;
const circle = (cx: number, cy: number, r: number, fill: string, extra = "") => `<circle cx="${cx}" cy="${cy}" r="${r}" fill="${fill}" ${extra}/>`;

function outdoor(horizon: number, sky: [string, string], ground: [string, string]): string {
  return `<defs>
    <linearGradient id="sky" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="${sky[0]}"/><stop offset="1" stop-color="${sky[1]}"/></linearGradient>
    <linearGradient id="ground" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="${ground[0]}"/><stop offset="1" stop-color="${ground[1]}"/></linearGradient>
  </defs>${rect(0, 0, W, horizon, "url(#sky)")}${rect(0, horizon, W, H - horizon, "url(#ground)")}`;
}

function indoor(wall: string, floor: string, horizon: number): string {
  return `${rect(0, 0, W, horizon, wall)}${rect(0, horizon, W, H - horizon, floor)}`;
}

/** Clouds, gravel: a little texture so the encoders have something to keep. */
function speckle(seed: number, y0: number, y1: number, count: number, tones: [number, number]): string {
  const rnd = seeded(seed);
  let out = "";
  for (let i = 0; i < count; i += 1) {
    const t = Math.round(tones[0] + rnd() * (tones[1] - tones[0]));
    out += circle(Math.round(rnd() * W), Math.round(y0 + rnd() * (y1 - y0)), 1 + Math.round(rnd() * 3), `rgb(${t},${t - 6},${t - 14})`);
  }
  return out;
}

/** The mark every demo picture carries: it is a drawing, not a photograph of a real place. */
function illustrationMark(title: string): string {
  return `<g font-family="DejaVu Sans, Liberation Sans, Arial, sans-serif">
    ${rect(0, 0, W, 12, "url(#hatch)")}${rect(0, H - 12, W, 12, "url(#hatch)")}
    <defs><pattern id="hatch" width="24" height="12" patternUnits="userSpaceOnUse"><rect width="24" height="12" fill="#1d1f24"/><path d="M0 12 L12 0 H24 L12 12Z" fill="#e8590c"/></pattern></defs>
    ${rect(40, 40, 430, 84, "#1d1f24", 'rx="4" opacity="0.92"')}
    <text x="62" y="98" font-size="46" font-weight="700" fill="#ffffff" letter-spacing="3">ILLUSTRATION</text>
    ${rect(40, H - 108, 1030, 60, "#1d1f24", 'rx="4" opacity="0.85"')}
    <text x="62" y="${H - 68}" font-size="26" fill="#f6f3ec">${title} · drawn for the demo, not a photograph</text>
  </g>`;
}

function chiller(x: number, y: number, scale = 1): string {
  const w = 250 * scale;
  const h = 120 * scale;
  let out = rect(x, y, w, h, "#d7dde3", `stroke="#505a64" stroke-width="${3 * scale}" rx="${4 * scale}"`);
  for (let i = 0; i < 3; i += 1) {
    const cx = x + (45 + i * 80) * scale;
    out += circle(cx, y + 4 * scale, 32 * scale, "#3c4650", `stroke="#9aa4ae" stroke-width="${3 * scale}"`);
    out += line(cx - 26 * scale, y + 4 * scale, cx + 26 * scale, y + 4 * scale, "#9aa4ae", 3 * scale);
  }
  for (let i = 0; i < 12; i += 1) out += line(x + (10 + i * 20) * scale, y + 40 * scale, x + (10 + i * 20) * scale, y + (h - 12 * scale), "#8a949e", 2 * scale);
  return out;
}

type Drawing = (seed: number) => string;

/** Hall 2A's frame from the site road, with `panels` cladding panels (30 px each) from the west end. */
function hallShell(seed: number, panels: number): string {
  let s = outdoor(700, ["#8fb3dd", "#eef3f8"], ["#b49a76", "#5e4f3c"]);
  for (let i = 0; i < 9; i += 1) {
    const x = 200 + i * 150;
    s += rect(x, 300, 18, 400, "#7d2f2f") + line(x + 9, 300, x + 84, 250, "#7d2f2f", 14);
    if (i < 8) s += line(x + 84, 250, x + 159, 300, "#7d2f2f", 14);
  }
  s += rect(200, 420, panels * 30, 280, "#9aa3ac", 'opacity="0.95"');
  for (let i = 0; i < panels; i += 1) s += line(200 + i * 30, 420, 200 + i * 30, 700, "#7c858e", 3);
  s += rect(1420, 90, 22, 610, "#e0b422") + rect(980, 90, 560, 22, "#e0b422") + line(1100, 112, 1100, 330, "#333", 3) + rect(1080, 330, 40, 30, "#444");
  s += speckle(seed, 720, H, 1100, [70, 160]);
  return s;
}

const DRAWINGS: Record<string, Drawing> = {
  "plant-yard": (seed) => {
    let s = outdoor(560, ["#6d9bd6", "#dfe9f5"], ["#a8a197", "#6f6a62"]);
    s += rect(120, 600, 1360, 300, "#c9c4bb", 'stroke="#8d877d" stroke-width="4"');
    for (let i = 0; i < 5; i += 1) s += chiller(170 + i * 260, 640, 0.9);
    s += rect(120, 820, 1360, 26, "#3c6e9e") + rect(120, 856, 1360, 18, "#9e3c3c");
    for (let x = 0; x < W; x += 60) s += line(x, 520, x, 600, "#5a5f66", 4);
    s += line(0, 530, W, 530, "#5a5f66", 3) + line(0, 565, W, 565, "#5a5f66", 3);
    s += speckle(seed, 880, H, 900, [90, 150]);
    return s;
  },
  "hall-shell": (seed) => hallShell(seed, 20),
  // The same view of Hall 2A nine weeks on, cladding most of the way along: the demo's then-and-now pair.
  "hall-shell-clad": (seed) => hallShell(seed, 28),
  "chiller-row": (seed) => {
    let s = outdoor(430, ["#7ea6d8", "#e7eef7"], ["#bcb7ae", "#7a746b"]);
    for (let i = 0; i < 5; i += 1) s += chiller(60 + i * 300, 470 + (i % 2) * 6, 1.1);
    for (let i = 0; i < 3; i += 1) s += rect(0, 680 + i * 40, W, 24, ["#3c6e9e", "#5c8ebe", "#9e3c3c"][i]!);
    s += speckle(seed, 820, H, 900, [100, 160]);
    return s;
  },
  "generator-set": (seed) => {
    let s = indoor("#c6c2b8", "#8f8a80", 640);
    for (let i = 0; i < 3; i += 1) {
      const x = 120 + i * 480;
      s += rect(x, 380, 400, 300, "#2f5d46", 'stroke="#1f3d2e" stroke-width="6" rx="6"');
      s += rect(x + 30, 420, 150, 110, "#24483a") + rect(x + 220, 420, 150, 110, "#24483a");
      for (let j = 0; j < 8; j += 1) s += line(x + 40 + j * 18, 430, x + 40 + j * 18, 520, "#3f7a5d", 4);
      s += rect(x + 300, 140, 40, 240, "#6b6b6b") + rect(x + 290, 130, 60, 20, "#4a4a4a");
    }
    s += rect(0, 690, W, 16, "#e0b422");
    s += speckle(seed, 720, H, 500, [110, 150]);
    return s;
  },
  "fuel-tank": (seed) => {
    let s = outdoor(520, ["#7aa1d2", "#e3ecf6"], ["#a3a08f", "#66624f"]);
    s += rect(180, 640, 1240, 240, "#b9b4aa", 'stroke="#8a857b" stroke-width="6"');
    s += `<rect x="260" y="470" width="1080" height="230" rx="115" fill="#e7e2d6" stroke="#7a7468" stroke-width="6"/>`;
    s += `<rect x="290" y="495" width="1020" height="180" rx="90" fill="none" stroke="#b3ad9f" stroke-width="4"/>`;
    for (let i = 0; i < 4; i += 1) s += rect(380 + i * 260, 690, 40, 60, "#6a655b");
    s += rect(1240, 420, 24, 60, "#9e3c3c") + line(1252, 420, 1500, 420, "#9e3c3c", 12);
    s += speckle(seed, 890, H, 700, [90, 140]);
    return s;
  },
  corridor: () => {
    let s = indoor("#e9e5dc", "#bfb9ad", H);
    s += `<polygon points="0,0 ${W},0 1000,420 600,420" fill="#f4f1ea"/>`;
    s += `<polygon points="0,${H} ${W},${H} 1000,640 600,640" fill="#b6afa1"/>`;
    s += `<polygon points="0,0 600,420 600,640 0,${H}" fill="#d9d3c6"/>`;
    s += `<polygon points="${W},0 1000,420 1000,640 ${W},${H}" fill="#cfc8ba"/>`;
    s += rect(600, 420, 400, 220, "#8c8577");
    for (let i = 0; i < 5; i += 1) {
      const t = i / 5;
      s += rect(700 - 500 * (1 - t) * 0.6, 60 + 300 * t, 200 + 500 * (1 - t) * 1.2, 10, "#fffbe8");
    }
    return s;
  },
  "security-doors": () => {
    let s = indoor("#d7d4cc", "#9c978c", 820);
    s += rect(520, 220, 560, 600, "#5d6670", 'stroke="#3b424a" stroke-width="10"');
    s += rect(540, 240, 255, 570, "#7b8792") + rect(805, 240, 255, 570, "#7b8792");
    s += rect(690, 330, 70, 140, "#b7d2e6") + rect(845, 330, 70, 140, "#b7d2e6");
    s += rect(1140, 460, 70, 110, "#2c2f33", 'rx="8"') + circle(1175, 495, 14, "#4caf50") + rect(1155, 525, 40, 28, "#555");
    s += rect(420, 140, 110, 50, "#eeeeee", 'rx="10"') + circle(505, 185, 22, "#222");
    return s;
  },
  "ups-room": (seed) => {
    let s = indoor("#e1ddd3", "#a9a397", 760);
    const rnd = seeded(seed);
    for (let i = 0; i < 7; i += 1) {
      const x = 90 + i * 205;
      s += rect(x, 260, 180, 500, "#3a4048", 'stroke="#23272c" stroke-width="4"');
      s += rect(x + 20, 290, 140, 70, "#1c2024");
      for (let j = 0; j < 3; j += 1) s += circle(x + 40 + j * 40, 400, 8, rnd() > 0.2 ? "#4caf50" : "#e8a317");
      for (let j = 0; j < 10; j += 1) s += line(x + 20, 450 + j * 28, x + 160, 450 + j * 28, "#4c535c", 4);
    }
    s += rect(0, 770, W, 12, "#e0b422");
    return s;
  },
  "cable-tray": () => {
    let s = indoor("#dcd8cf", "#b4aea2", 900);
    for (let i = 0; i < 3; i += 1) {
      const y = 150 + i * 120;
      s += `<polygon points="0,${y} ${W},${y - 60} ${W},${y - 20} 0,${y + 40}" fill="#9aa1a8" stroke="#6c737a" stroke-width="4"/>`;
      const colours = ["#2b2b2b", "#1f4e8c", "#c2410c", "#2f6b3a", "#6b3f8c"];
      colours.forEach((c, j) => {
        s += `<path d="M0 ${y + 8 + j * 6} L${W} ${y - 52 + j * 6}" stroke="${c}" stroke-width="5"/>`;
      });
    }
    for (let i = 0; i < 8; i += 1) s += rect(120 + i * 190, 560, 150, 340, "#2d3238", 'stroke="#111" stroke-width="3"');
    return s;
  },
  "roof-plant": (seed) => {
    let s = outdoor(380, ["#5f8fcf", "#d6e4f3"], ["#8d8f93", "#5b5e63"]);
    for (let i = 0; i < 4; i += 1) {
      const x = 120 + i * 370;
      s += rect(x, 480, 300, 200, "#c3c9cf", 'stroke="#5b636b" stroke-width="4"');
      s += circle(x + 80, 480, 55, "#3c4650") + circle(x + 220, 480, 55, "#3c4650");
    }
    for (let i = 0; i < 30; i += 1) s += line(80 + i * 48, 760, 80 + i * 48, 860, "#6b6f75", 10);
    s += rect(60, 740, 1480, 20, "#6b6f75");
    s += speckle(seed, 880, H, 600, [80, 120]);
    return s;
  },
  perimeter: (seed) => {
    let s = outdoor(600, ["#86acd9", "#eaf1f8"], ["#8a9a6b", "#55633f"]);
    for (let x = 0; x < W; x += 40) s += line(x, 420, x, 640, "#4c5157", 5);
    s += line(0, 430, W, 430, "#4c5157", 4) + line(0, 530, W, 530, "#4c5157", 3) + line(0, 630, W, 630, "#4c5157", 4);
    s += rect(1080, 420, 320, 260, "#d6d1c4", 'stroke="#7a7466" stroke-width="6"') + rect(1120, 470, 110, 80, "#a9c7de") + rect(1260, 520, 90, 160, "#6b5a44");
    s += rect(700, 600, 380, 24, "#c62828") + rect(700, 600, 40, 24, "#fff") + rect(780, 600, 40, 24, "#fff") + rect(860, 600, 40, 24, "#fff");
    s += rect(1405, 330, 10, 300, "#333") + rect(1380, 320, 60, 30, "#eee", 'rx="6"');
    s += speckle(seed, 700, H, 900, [60, 120]);
    return s;
  },
  "hd1-containment": () => {
    let s = indoor("#d9d6cf", "#c4c0b6", 880);
    s += rect(0, 880, W, 187, "#bdb8ad");
    for (let i = 0; i < 17; i += 1) s += line(i * 100, 880, i * 100 - 40, H, "#a7a296", 3);
    s += rect(150, 180, 1300, 40, "#f2f2f0", 'opacity="0.9"');
    for (let i = 0; i < 10; i += 1) {
      const x = 150 + i * 130;
      s += rect(x, 260, 118, 620, "#1f2226", 'stroke="#3a3f45" stroke-width="3"');
      for (let j = 0; j < 20; j += 1) s += rect(x + 12, 290 + j * 28, 94, 16, j % 3 === 0 ? "#2e3338" : "#262a2e");
      s += circle(x + 100, 300, 5, "#5cb8ff");
    }
    s += rect(150, 220, 1300, 40, "#3c78b4", 'opacity="0.35"');
    return s;
  },
};

interface DemoPhoto {
  file: string;
  drawing: keyof typeof DRAWINGS;
  title: string;
  weeksAgo: number;
  area: string;
  systems: System[];
  /** Start of a programme milestone's name, found if the programme seed has run. */
  milestone?: string;
  altText?: string;
  caption?: string;
  focal?: { x: number; y: number };
  review?: "cleared" | "restricted";
}

const PHOTOS: DemoPhoto[] = [
  { file: "plant-yard-slab.jpg", drawing: "plant-yard", title: "Plant yard slab and chiller bases", weeksAgo: 38, area: "Plant yard", systems: ["building"], milestone: "Ground works", altText: "Drawing of the plant yard: a concrete slab behind a temporary fence, with five chiller bases and pipe runs in place.", caption: "The plant-yard slab is poured and the chiller bases are set out.", review: "cleared" },
  { file: "hall-2a-frame.jpg", drawing: "hall-shell", title: "Hall 2A steel frame", weeksAgo: 33, area: "Hall 2A", systems: ["building"], milestone: "Steel frame topped out", altText: "Drawing of the Hall 2A steel frame: red portal frames along the hall, cladding begun at one end and a tower crane on the right.", caption: "Hall 2A's steel frame is topped out; cladding starts at the west end.", focal: { x: 0.35, y: 0.5 }, review: "cleared" },
  { file: "hall-2a-cladding.jpg", drawing: "hall-shell-clad", title: "Hall 2A cladding", weeksAgo: 24, area: "Hall 2A", systems: ["building"], milestone: "Roof and cladding weathertight", altText: "Drawing of the Hall 2A steel frame from the same spot as before: grey cladding now runs past the middle of the hall, with the tower crane on the right.", caption: "Nine weeks on, Hall 2A's cladding runs past the middle of the hall.", focal: { x: 0.45, y: 0.5 }, review: "cleared" },
  { file: "perimeter-gatehouse.jpg", drawing: "perimeter", title: "Perimeter fence and gatehouse", weeksAgo: 27, area: "Site", systems: ["security"], milestone: "Perimeter fence", altText: "Drawing of the site boundary: a security fence, a vehicle barrier and the gatehouse.", caption: "The perimeter fence line and gatehouse are complete." },
  { file: "roof-plant.jpg", drawing: "roof-plant", title: "Roof plant and louvres", weeksAgo: 22, area: "Hall 2A", systems: ["cooling", "building"], milestone: "Roof and cladding weathertight", altText: "Drawing of the Hall 2A roof: four plant units with round fans behind a row of louvres.", caption: "The roof is weathertight and the roof plant is lifted in.", review: "cleared" },
  { file: "fuel-tank.jpg", drawing: "fuel-tank", title: "Bulk fuel tank", weeksAgo: 18, area: "Plant yard", systems: ["fuel"], milestone: "Bulk fuel tank installed", altText: "Drawing of a long double-skinned fuel tank lying on its bund, with a red fill line to the right.", caption: "The 40,000 L double-skinned bulk tank is installed and pressure-tested.", review: "cleared" },
  { file: "generator-hall.jpg", drawing: "generator-set", title: "Generator hall", weeksAgo: 14, area: "Energy centre", systems: ["power"], milestone: "Generators delivered", altText: "Drawing of the generator hall: three green generator sets in a row, each with an exhaust stack rising to the roof.", caption: "All three 1,250 kVA generator sets are delivered and set on their plinths.", review: "cleared" },
  { file: "chiller-row.jpg", drawing: "chiller-row", title: "Chiller row", weeksAgo: 11, area: "Plant yard", systems: ["cooling"], milestone: "Chillers delivered", altText: "Drawing of five air-cooled chillers side by side, each with three fans on top, with chilled-water pipes in front.", caption: "Four of the five 400 kW chillers are set; the fifth follows the crane.", focal: { x: 0.5, y: 0.55 }, review: "cleared" },
  { file: "ups-room.jpg", drawing: "ups-room", title: "UPS room", weeksAgo: 8, area: "Energy centre", systems: ["power"], milestone: "UPS modules installed", altText: "Drawing of the UPS room: a line of dark cabinets with small green and amber status lights.", caption: "UPS modules and battery strings are going in.", review: "cleared" },
  { file: "hall-2a-corridor.jpg", drawing: "corridor", title: "Hall 2A corridor", weeksAgo: 6, area: "Hall 2A", systems: ["fit-out"], milestone: "Hall 2A raised floor", caption: "The Hall 2A corridor after second-fix lighting.", review: "cleared" },
  { file: "cable-tray.jpg", drawing: "cable-tray", title: "Cable tray over the rack rows", weeksAgo: 4, area: "Hall 2A", systems: ["fit-out", "power"], milestone: "Hall 2A raised floor", altText: "Drawing of three levels of cable tray carrying coloured cables above a row of racks." },
  { file: "security-doors.jpg", drawing: "security-doors", title: "Entry doors to the data hall", weeksAgo: 3, area: "Hall 2A", systems: ["security"], milestone: "Access control", altText: "Drawing of a pair of steel doors with a card reader beside them and a camera above.", caption: "Interlocked entry doors to Hall 2A.", review: "restricted" },
  { file: "hd1-containment.jpg", drawing: "hd1-containment", title: "HD-1 containment", weeksAgo: 2, area: "HD-1", systems: ["fit-out"], milestone: "HD-1 high-density", altText: "Drawing of a row of ten black racks under a clear containment roof in the high-density suite.", caption: "HD-1's sealed containment is up over the first rack row.", review: "cleared" },
];

async function drawPhoto(p: DemoPhoto, index: number, takenAt: DateTime): Promise<Buffer> {
  const body = DRAWINGS[p.drawing]!(101 + index);
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">${body}${illustrationMark(p.title)}</svg>`;
  return sharp(Buffer.from(svg))
    .jpeg({ quality: 86 })
    .withExif({ IFD0: { Software: "Plumbline demo seed", ImageDescription: "Illustration" }, IFD2: { DateTimeOriginal: takenAt.toFormat("yyyy:LL:dd HH:mm:ss"), OffsetTimeOriginal: takenAt.toFormat("ZZ") } })
    .toBuffer();
}

/** MEDIA_DIR as the server reads it; under the test runner, the test database's own folder. */
export function seedMediaDir(db: Knex): string {
  if (process.env.MEDIA_DIR) return process.env.MEDIA_DIR;
  if (process.env.NODE_ENV === "test") {
    const connection = db.client.config.connection as { database?: string };
    return testMediaDirFor(connection.database ?? "plumbline");
  }
  return "media";
}

/**
 * Seeds the demo photos into a project that has none (idempotent: a project with any
 * media is left alone). Returns how many were made and how long it took, milliseconds.
 */
export async function seedMedia(db: Knex, projectId: number, opts: { mediaDir?: string; today?: DateTime; config?: Config } = {}): Promise<{ created: number; ms: number; rewritten: number; notRemovable: number[] }> {
  const started = Date.now();
  const mediaDir = opts.mediaDir ?? seedMediaDir(db);
  // The store the server will read: the given configuration's, or MEDIA_STORE and the S3 settings as
  // `npm start` passes them; the local folder otherwise.
  const config = opts.config ?? (process.env.MEDIA_STORE === "s3" ? loadConfig({ ...process.env, MEDIA_DIR: mediaDir }) : null);
  const storage = config ? createMediaStorage(config) : { ...createLocalDiskStorage(mediaDir), close() {} };
  const uploads = createUploadArea(mediaDir);
  const projects = createProjectsService(db);
  const limits = { maxFileBytes: 40 * 1024 * 1024, maxFiles: 20, maxPixels: 100_000_000 };
  const accounts = createAccountsService({ db });
  const media = createMediaService({ db, storage, uploads, projects, programme: createProgrammeService({ db, projects, accounts }), accounts, limits });
  if ((await media.countOfProject(projectId)) > 0) {
    // Originals stored before location was removed at upload lose it now (issue 9).
    const { rewritten, notRemovable } = await media.removeLocationFromOriginals(projectId);
    storage.close();
    return { created: 0, ms: Date.now() - started, rewritten, notRemovable };
  }
  const project = await projects.getById(projectId);
  const jobs = createMediaJobs({ media, storage, uploads, logger: pino({ level: "silent" }), workers: 0, maxPixels: limits.maxPixels });

  const actorFor = async (email: string, role: "marketing" | "lead"): Promise<Actor> => {
    const u = (await db("users").where({ email }).first("id", "name")) as { id: number; name: string } | undefined;
    return { user: u ? { id: Number(u.id), email, name: String(u.name), role } : null, ip: null };
  };
  const marketing = await actorFor("marketing@kestrel.example", "marketing");
  const lead = await actorFor("lead@kestrel.example", "lead");
  const milestones = (await db("milestones").where({ project_id: projectId }).select("id", "name")) as Array<{ id: number; name: string }>;
  const today = (opts.today ?? DateTime.now()).setZone(TZ).startOf("day");

  const ids: number[] = [];
  for (const [i, p] of PHOTOS.entries()) {
    const takenAt = today.minus({ weeks: p.weeksAgo }).set({ hour: 9 + (i % 6), minute: (i * 17) % 60 });
    const file = await uploads.writeTemporary(await drawPhoto(p, i, takenAt), p.file);
    const [result] = await media.upload({ project: project.slug, files: [file], isIllustration: true }, marketing);
    ids.push(result!.id);
  }
  await jobs.drain();

  for (const [i, p] of PHOTOS.entries()) {
    const id = ids[i]!;
    const milestone = p.milestone ? milestones.find((m) => m.name.startsWith(p.milestone!)) : undefined;
    const patch: MediaPatchInput = {
      tags: { areas: [p.area], systems: p.systems, milestones: milestone ? [Number(milestone.id)] : [] },
      credit: "Plumbline demo illustration",
      ...(p.altText ? { altText: p.altText } : {}),
      ...(p.caption ? { caption: p.caption } : {}),
      ...(p.focal ? { focal: p.focal } : {}),
    };
    await media.update(id, patch, marketing);
    if (p.review) await media.review(id, { sensitivity: p.review }, lead);
  }
  storage.close();
  return { created: ids.length, ms: Date.now() - started, rewritten: 0, notRemovable: [] };
}
