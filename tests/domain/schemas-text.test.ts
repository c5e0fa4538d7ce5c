import { readdirSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { TEXT_CHECKS, textProblem } from "../../src/shared/schemas/text.ts";
import { cleanRichText, RichTextDocSchema } from "../../src/shared/schemas/rich-text.ts";
import { PostCreateInputSchema, PostTagSchema } from "../../src/shared/schemas/posts.ts";
import { EnquiryInputSchema } from "../../src/shared/schemas/enquiries.ts";
import { CsvImportInputSchema, MilestoneCreateInputSchema } from "../../src/shared/schemas/programme.ts";
import { MediaPatchInputSchema } from "../../src/shared/schemas/media.ts";
import { SubscriptionInputSchema } from "../../src/shared/schemas/subscribers.ts";

/**
 * Every text field of every shared schema refuses control characters (issue #9 item 2): the
 * walk below finds each string in every exported schema and asks which rule it carries, so a
 * schema added later with a bare z.string() fails here until it uses plainText() or
 * multilineText() (or is one of the few exceptions listed, with the reason).
 */

const SCHEMA_DIR = fileURLToPath(new URL("../../src/shared/schemas/", import.meta.url));
const modules = await Promise.all(
  readdirSync(SCHEMA_DIR)
    .filter((f) => f.endsWith(".ts"))
    .map(async (f) => [f.replace(/\.ts$/, ""), (await import(`../../src/shared/schemas/${f}`)) as Record<string, unknown>] as const),
);

/** Strings that are not typed text, each with why it takes any characters. */
const EXEMPT: Record<string, string> = {
  "auth.LoginInputSchema.password": "a secret: hashed, never shown, and refusing characters at sign-in could lock a user out",
  "auth.NewPasswordSchema": "a secret, hashed and never shown",
  "auth.AcceptInvitationInputSchema.password": "a secret, hashed and never shown",
  "auth.ResetPasswordInputSchema.password": "a secret, hashed and never shown",
  "auth.UserSchema.email": "an answer's shape, not input",
  "auth.UserSchema.name": "an answer's shape, not input",
  "digests.DigestWebParamSchema.token": "a signed token: anything else fails its signature with 404",
  "review-links.ReviewTokenParamSchema.token": "a signed review-link token: anything else fails its signature with 404",
  "digests.DigestArchiveLinkParamSchema.token": "a signed preferences token: anything else fails its signature with 404",
  "digests.DigestArchiveCopyParamSchema.token": "a signed preferences token: anything else fails its signature with 404",
  "media.SignedVariantQuerySchema.sig": "a signature: anything else fails to verify with 404",
  "enquiries.CapacityEnquirySchema.website": "the honeypot: refusing some characters would tell a robot which field is the trap",
  "enquiries.VisitEnquirySchema.website": "the honeypot",
  "enquiries.GeneralEnquirySchema.website": "the honeypot",
  "enquiries.EnquiryInputSchema.website": "the honeypot",
};

type Rule = "oneLine" | "multiline" | "format" | "none";
interface Found {
  path: string;
  schema: z.ZodType;
  rule: Rule;
}

interface Def {
  type: string;
  checks?: Array<{ _zod: { def: { check: string } } }>;
  shape?: Record<string, z.ZodType>;
  innerType?: z.ZodType;
  in?: z.ZodType;
  out?: z.ZodType;
  element?: z.ZodType;
  options?: z.ZodType[];
  left?: z.ZodType;
  right?: z.ZodType;
  valueType?: z.ZodType;
  getter?: () => z.ZodType;
  format?: string;
}
const defOf = (s: z.ZodType) => (s as unknown as { _zod: { def: Def } })._zod.def;

function ruleOf(s: z.ZodType): Rule {
  const def = defOf(s);
  const checks = (def.checks ?? []) as unknown[];
  if (checks.includes(TEXT_CHECKS.oneLine)) return "oneLine";
  if (checks.includes(TEXT_CHECKS.multiline)) return "multiline";
  // A regex or a format (e-mail, slug, token, date) admits no control character by its pattern.
  if (def.format || (def.checks ?? []).some((c) => c._zod.def.check === "string_format")) return "format";
  return "none";
}

function walk(s: z.ZodType, path: string, out: Found[], seen: Set<unknown>): void {
  if (seen.has(s)) return;
  seen.add(s);
  const def = defOf(s);
  switch (def.type) {
    case "string":
      out.push({ path, schema: s, rule: ruleOf(s) });
      return;
    case "object":
      for (const [k, v] of Object.entries(def.shape ?? {})) walk(v, `${path}.${k}`, out, seen);
      return;
    case "pipe": {
      // A string refined into a format (EmailSchema: trimmed and lower-cased, then z.email()) is one field.
      const [a, b] = [defOf(def.in!), defOf(def.out!)];
      if (a.type === "string" && b.type === "string") {
        const rules = [ruleOf(def.in!), ruleOf(def.out!)];
        out.push({ path, schema: s, rule: rules.find((r) => r !== "none") ?? "none" });
        return;
      }
      walk(def.in!, path, out, seen);
      walk(def.out!, path, out, seen);
      return;
    }
    case "array":
      walk(def.element!, path, out, seen);
      return;
    case "union":
      for (const o of def.options ?? []) walk(o, path, out, seen);
      return;
    case "intersection":
      walk(def.left!, path, out, seen);
      walk(def.right!, path, out, seen);
      return;
    case "record":
      walk(def.valueType!, path, out, seen);
      return;
    case "lazy":
      walk(def.getter!(), path, out, seen);
      return;
    default:
      if (def.innerType) walk(def.innerType, path, out, seen);
  }
}

const found: Found[] = [];
for (const [name, mod] of modules) {
  if (name === "rich-text") continue; // bodies are cleaned, not refused: tested below
  for (const [exported, value] of Object.entries(mod)) {
    // Rich-text bodies are cleaned rather than refused (tested below), wherever a schema holds one.
    if (value instanceof z.ZodType) walk(value, `${name}.${exported}`, found, new Set([RichTextDocSchema]));
  }
}
const textFields = found.filter((f) => f.rule === "oneLine" || f.rule === "multiline");

// Source: XML 1.0 (Fifth Edition) §2.2, production [2] Char — #x9 | #xA | #xD | [#x20-#xD7FF] |
// [#xE000-#xFFFD] | [#x10000-#x10FFFF]; it also discourages [#x7F-#x84], [#x86-#x9F].
const C0 = Array.from({ length: 0x20 }, (_, i) => String.fromCharCode(i));
const LINE_CHARS = ["\t", "\n", "\r"];
const C0_NOT_LINE = C0.filter((c) => !LINE_CHARS.includes(c));
const OTHERS = ["\u007F", "\u0080", "\u0085", "\u009F", "\uD800", "\uDBFF", "\uDC00", "\uDFFF", "\uFFFE", "\uFFFF"];
const hex = (c: string) => `U+${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, "0")}`;
/**
 * Answer schemas: what the server sends, parsed by nobody (the client takes their types with
 * z.infer). Control characters are refused where the text comes in, not where it goes out.
 */
const ANSWERS = new Set([
  "auth.InvitationViewSchema",
  "auth.ResetRequestedSchema",
  "auth.SessionSchema",
  "auth.SignedInSchema",
  "common.ApiErrorBodySchema",
  "common.NamedSchema",
  "digests.DigestArchiveCopySchema",
  "digests.DigestArchiveItemSchema",
  "digests.DigestArchivePageSchema",
  "digests.DigestPreviewSchema",
  "office.OfficeWaitingSchema",
  "office.WaitingItemSchema",
  "digests.DigestRunSummarySchema",
  "digests.DigestTestSentSchema",
  "digests.DigestUpcomingSchema",
  "enquiries.EnquiryAcceptedSchema",
  "enquiries.EnquiryOwnerSchema",
  "enquiries.EnquiryRowSchema",
  "media.BulkTagResultSchema",
  "media.GalleryPhotoSchema",
  "media.GallerySchema",
  "media.MediaItemSchema",
  "media.MediaListResponseSchema",
  "media.MediaPictureSchema",
  "media.MediaUploadResultSchema",
  "media.MediaVariantSchema",
  "media.MediaVocabularySchema",
  "media.PictureVariantSchema",
  "media.RefusedFileSchema",
  "outbox.OutboxMessageSchema",
  "press-kits.PressUsageTermsSchema",
  "projects.ProjectRefSchema",
  "projects.ProjectSchema",
  "review-links.ReviewLinkCreatedSchema",
  "review-links.ReviewLinkEventSchema",
  "review-links.ReviewLinkListSchema",
  "review-links.ReviewLinkSchema",
  "risks.RiskRefSchema",
  "writing-help.DraftSuggestionAnswerSchema",
  "writing-help.DraftSuggestionSchema",
  "writing-help.SuggestedPhotoSchema",
  "writing-help.SuggestionMoveSchema",
  "writing-help.ThenAndNowAnswerSchema",
  "writing-help.ThenAndNowPairSchema",
  "project-hero.HeroSchema",
  "project-hero.HomeBuildSchema",
  "project-hero.HomeSchema",
  "projects.ProjectSettingsSchema",
  "site-plan.SiteAreaSchema",
  "site-plan.SitePlanSchema",
  "subscribers.ConfirmationDoneSchema",
  "subscribers.ConfirmationViewSchema",
  "subscribers.InvestorDigestSettingSchema",
  "subscribers.PreferencesViewSchema",
  "subscribers.SubscriberImportErrorBodySchema",
  "subscribers.SubscriberImportResultSchema",
  "subscribers.SubscriberListSchema",
  "subscribers.SubscriberRowSchema",
  "subscribers.SubscriptionAcceptedSchema",
  "subscribers.SubscriptionOptionsSchema",
  "subscribers.UnsubscribeViewSchema",
  "users.AuditEventSchema",
  "users.InvitationRowSchema",
  "users.InvitationSentSchema",
  "users.UserRowSchema",
]);
const isAnswer = (path: string) => ANSWERS.has(path.split(".").slice(0, 2).join("."));

const probe = (c: string) => `Chillers on their plinths${c}Hall 2A`;
const messages = (r: { success: boolean; error?: z.ZodError }) => (r.error?.issues ?? []).map((i) => i.message).join(" | ");

describe("text fields of the shared schemas", () => {
  it("every string of every exported schema refuses control characters, or is listed as exempt with its reason", () => {
    expect(textFields.length).toBeGreaterThan(40);
    const bare = found.filter((f) => f.rule === "none" && !EXEMPT[f.path] && !isAnswer(f.path)).map((f) => f.path);
    expect(bare).toEqual([]);
  });

  it("the exemptions still exist (a stale entry would hide a new field of the same name)", () => {
    const paths = new Set(found.filter((f) => f.rule === "none").map((f) => f.path));
    expect(Object.keys(EXEMPT).filter((p) => !paths.has(p))).toEqual([]);
    const schemas = new Set(found.map((f) => f.path.split(".").slice(0, 2).join(".")));
    expect([...ANSWERS].filter((a) => !schemas.has(a))).toEqual([]);
  });

  it("walks the facility's input schemas and leaves its answers out (grouped in FACILITY_ANSWERS, as the programme's are in PROGRAMME_ANSWERS)", () => {
    const paths = textFields.map((f) => f.path);
    for (const input of ["facility.BlockCreateInputSchema.name", "facility.SystemPatchInputSchema.notes", "facility.UnitStageInputSchema.note", "facility.FeatureCreateInputSchema.detail"]) expect(paths).toContain(input);
    expect(found.filter((f) => /^facility\.\w*(Answer|Event)Schema\./.test(f.path)).map((f) => f.path)).toEqual([]);
  });

  describe.each(textFields.map((f) => [f.path, f] as const))("%s", (_path, field) => {
    it("accepts ordinary text, with letters from beyond the Basic Multilingual Plane", () => {
      const r = field.schema.safeParse("Chillers on their plinths — Hall 2A 🏗");
      // Some fields have their own format (a phone number, a topic); they refuse this probe for that reason, never for control characters.
      expect(messages(r)).not.toMatch(/control character|one line|not text/);
    });

    it.each(C0_NOT_LINE.concat(OTHERS).map((c) => [hex(c), c]))("refuses %s inside the text, saying which character", (code, c) => {
      const r = field.schema.safeParse(probe(c));
      expect(r.success).toBe(false);
      expect(messages(r)).toContain(code);
    });

    it.each(LINE_CHARS.map((c) => [hex(c), c]))(`${field.rule === "multiline" ? "accepts" : "refuses"} %s inside the text`, (_code, c) => {
      const r = field.schema.safeParse(probe(c));
      if (field.rule === "multiline") expect(messages(r)).not.toMatch(/control character|one line|not text/);
      else expect(messages(r)).toContain("must be on one line");
    });
  });
});

describe("a refusal names the field (what the 400 answer's fields are made from)", () => {
  const post = { title: "Chillers on their plinths", summary: "All five are set.", body: { type: "doc", content: [] }, audience: "public" };
  it.each([
    ["post title", PostCreateInputSchema, { ...post, title: "Chillers\u0007 set" }, "title"],
    ["post summary", PostCreateInputSchema, { ...post, summary: "All five\u0000 are set." }, "summary"],
    ["post tag", PostCreateInputSchema, { ...post, tags: [{ kind: "area", value: "Hall\u001B 2A" }] }, "tags.0.value"],
    ["milestone name", MilestoneCreateInputSchema, { name: "IST\u000C level 5", phase: "Commissioning", system: "cooling", weight: 1, baselineFinish: "2027-03-01", audience: "public" }, "name"],
    ["media credit", MediaPatchInputSchema, { credit: "Site\nteam" }, "credit"],
    ["media alt text", MediaPatchInputSchema, { altText: "Two chillers\u0008" }, "altText"],
    ["enquiry message", EnquiryInputSchema, { kind: "general", name: "Ann Lee", email: "ann@example.test", message: "When is Hall 2A\u0003 ready for service?" }, "message"],
    ["subscriber organisation", SubscriptionInputSchema, { email: "ann@example.test", name: "Ann Lee", organisation: "North\u001F Row", interest: "press", frequency: "weekly", projectSlug: "aldermere-phase-2" }, "organisation"],
    ["programme CSV (multi-line, so the line is named)", CsvImportInputSchema, { csv: "name,phase\nIST,Commissioning\u0000\n" }, "csv"],
  ])("%s", (_name, schema, input, path) => {
    const r = (schema as z.ZodType).safeParse(input);
    expect(r.success).toBe(false);
    const issue = r.error!.issues.find((i) => i.path.join(".") === path);
    expect(issue?.message).toMatch(/control character|one line/);
  });

  it("says on which line of a multi-line text the character is", () => {
    expect(textProblem("name,phase\nIST,Commissioning\u0000\n", true)).toBe("contains a control character (U+0000) on line 2, which is not allowed");
  });

  it("trims before checking, so a pasted title's trailing line break is not an error", () => {
    expect(PostTagSchema.parse({ kind: "area", value: "Hall 2A\r\n" }).value).toBe("Hall 2A");
  });
});

describe("rich-text bodies: control characters are removed, not refused", () => {
  it.each(C0_NOT_LINE.concat(OTHERS).map((c) => [hex(c), c]))("removes %s from text, link targets and titles, alt text and captions", (_code, c) => {
    const body = {
      type: "doc",
      content: [
        { type: "paragraph", content: [{ type: "text", text: `Hall${c} 2A`, marks: [{ type: "link", attrs: { href: `https://kestrel${c}.example/progress`, title: `Pro${c}gress` } }] }] },
        { type: "paragraph", content: [{ type: "text", text: c }, { type: "text", text: "kept" }] },
        { type: "image", attrs: { mediaId: 3, alt: `Two${c} chillers`, caption: `Plant${c} yard` } },
      ],
    };
    const parsed = RichTextDocSchema.parse(body);
    expect(parsed).toEqual({
      type: "doc",
      content: [
        { type: "paragraph", content: [{ type: "text", text: "Hall 2A", marks: [{ type: "link", attrs: { href: "https://kestrel.example/progress", title: "Progress" } }] }] },
        // A text node of nothing but control characters goes: the editor never makes an empty one.
        { type: "paragraph", content: [{ type: "text", text: "kept" }] },
        { type: "image", attrs: { mediaId: 3, alt: "Two chillers", caption: "Plant yard" } },
      ],
    });
  });

  it("keeps tab and line breaks in text; removes them from a link target (as a browser reads a URL) and makes them a space in alt text and captions", () => {
    const parsed = RichTextDocSchema.parse({
      type: "doc",
      content: [
        { type: "paragraph", content: [{ type: "text", text: "a\tb\nc\rd", marks: [{ type: "link", attrs: { href: "https://kestrel.exa\tmple/\n", title: "Progress\r\nnotes" } }] }] },
        { type: "image", attrs: { mediaId: 3, alt: "Two\nchillers", caption: "Plant\t\tyard" } },
      ],
    });
    expect(parsed.content[0]!.content![0]).toEqual({ type: "text", text: "a\tb\nc\rd", marks: [{ type: "link", attrs: { href: "https://kestrel.example/", title: "Progress notes" } }] });
    expect(parsed.content[1]!.attrs).toEqual({ mediaId: 3, alt: "Two chillers", caption: "Plant yard" });
  });

  it("still refuses a link that is dangerous once cleaned", () => {
    const r = RichTextDocSchema.safeParse({ type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "x", marks: [{ type: "link", attrs: { href: "java\u0000script:alert(1)" } }] }] }] });
    expect(r.success).toBe(false);
  });

  it("cleans a stored body without changing a clean one", () => {
    const clean = { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "Hall 2A" }] }] };
    expect(cleanRichText(clean)).toEqual(clean);
    expect(cleanRichText({ type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "Hall\u0000 2A" }] }] })).toEqual(clean);
  });
});
