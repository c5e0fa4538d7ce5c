import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { ACCENT, INK } from "../../src/shared/look.ts";

// Decision 056: one orange for the app and its e-mails, one word per audience, and shapes that mean
// one thing across screens (the vocabulary is in DEVELOPERS.md). These read the source, so a
// retired word or a second orange fails here before anyone sees it on a screen.

const ROOT = join(import.meta.dirname, "../..");

function filesUnder(dir: string, ext: RegExp): string[] {
  const out: string[] = [];
  for (const name of readdirSync(join(ROOT, dir))) {
    const rel = join(dir, name);
    if (statSync(join(ROOT, rel)).isDirectory()) out.push(...filesUnder(rel, ext));
    else if (ext.test(name)) out.push(rel);
  }
  return out;
}

/** The file without its comments, so a comment may still say why a word was retired. */
function code(rel: string): string {
  return readFileSync(join(ROOT, rel), "utf8")
    .replace(/\/\*[\s\S]*?\*\//g, "")
    .replace(/(^|[^:"'`])\/\/.*$/gm, "$1");
}

const UI = filesUnder("src", /\.(ts|tsx)$/);

describe("one orange", () => {
  it("the app's theme and the server's e-mails use the same accent and ink", () => {
    const css = readFileSync(join(ROOT, "src/index.css"), "utf8");
    expect(css).toMatch(new RegExp(`--color-accent:\\s*${ACCENT};`, "i"));
    expect(css).toMatch(new RegExp(`--color-ink:\\s*${INK};`, "i"));
  });

  it("no e-mail template carries an orange of its own", () => {
    const offenders = filesUnder("server", /\.ts$/)
      .filter((f) => !f.startsWith("server/seed"))
      .filter((f) => /#(e8590c|b34709|c2410c)\b/i.test(code(f)));
    expect(offenders).toEqual([]);
  });

  it("ticks, choices and sliders are ink: no control sets an orange accent of its own, and the base rule says ink", () => {
    const offenders = UI.filter((f) => /\baccent-\[(#c2410c|#e8590c|var\(--color-accent(-bright)?\))\]/i.test(code(f)));
    expect(offenders).toEqual([]);
    const css = readFileSync(join(ROOT, "src/index.css"), "utf8");
    expect(css).toMatch(/input\[type="checkbox"\],\s*input\[type="radio"\],\s*input\[type="range"\]\s*\{\s*accent-color:\s*var\(--color-ink\);/);
  });

  it("links and tabs are not orange: no `text-accent` and no orange tab underline anywhere in the app", () => {
    const offenders = UI.filter((f) => /\btext-accent\b|"border-accent font-semibold/.test(code(f)));
    expect(offenders).toEqual([]);
  });
});

describe("one word per idea", () => {
  it.each([
    ["the staff audience is never called Internal", /["'>`]Internal["'<`]/],
    ["a photo waiting for review is never called Unreviewed", /["'>`]Unreviewed["'<`]/],
    ["no developer wording about the mail sink", /local (mail )?sink|local mail mode/i],
  ])("%s", (_what, pattern) => {
    expect(UI.filter((f) => pattern.test(code(f)))).toEqual([]);
  });
});

describe("shapes mean one thing", () => {
  // ○ is "still to do, going to plan" only: programme status, planned features, stages not reached, reopened.
  it("the open ring appears only where it means still to do, going to plan", () => {
    const allowed = [
      "src/components/ui/status-mark.tsx",
      "src/features/facility/components/feature-list.tsx",
      "src/features/facility/components/stage-preview.tsx",
      "src/features/programme/components/moves-list.tsx",
    ];
    expect(UI.filter((f) => code(f).includes("○") && !allowed.includes(f))).toEqual([]);
  });

  it("◆ means new and nothing else", () => {
    expect(UI.filter((f) => code(f).includes("◆"))).toEqual(["src/features/enquiries/words.ts"]);
  });
});
