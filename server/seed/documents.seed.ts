import type { Knex } from "knex";
import { DateTime } from "luxon";
import { PDFDocument, rgb, StandardFonts } from "pdf-lib";
import type { DocumentCreateFields } from "#shared/schemas/documents.ts";
import type { Actor } from "../core/types.ts";
import { createDocumentsService } from "../documents/documents.service.ts";
import { createLocalDiskStorage, createUploadArea } from "../media/media.storage.ts";
import { createProjectsService } from "../projects/projects.service.ts";
import { createAccountsService } from "../users/users.accounts.ts";
import { seedMediaDir } from "./media.seed.ts";
import { countOf } from "../db/rows.ts";

/**
 * The demo's document library: six invented documents (two monthly monitoring reports, a lender
 * pack, two certificates, a technical note with two versions), made here as PDFs with pdf-lib and
 * taken in through the library's own intake, then dated over the last weeks, with a history of
 * the demo investor's views. Idempotent: a project that has any document is left alone. Runs
 * after the record seed, which makes the organisations: the lender pack is limited to the demo
 * investor's organisation when they have one.
 */

const TZ = "Europe/London";
const INVESTOR = "investor@harbourfund.example";

interface SeedDocument {
  key: string;
  fields: Omit<DocumentCreateFields, "organisationIds">;
  file: string;
  lines: string[];
  daysAgo: number;
  limitToInvestorOrganisation?: boolean;
  /** A second version, this many days ago, with its note and changed lines. */
  second?: { daysAgo: number; note: string; lines: string[] };
}

function documentsFor(today: DateTime): SeedDocument[] {
  const lastMonth = today.minus({ months: 1 }).endOf("month");
  const monthBefore = today.minus({ months: 2 }).endOf("month");
  const report = (month: DateTime, daysAgo: number, lines: string[]): SeedDocument => ({
    key: `report-${month.toFormat("yyyy-LL")}`,
    fields: { title: `Monthly monitoring report, ${month.toFormat("LLLL yyyy")}`, category: "monitoring_report", period: month.toFormat("LLLL yyyy"), periodEnd: month.toISODate()!, audience: "investor" },
    file: `monitoring-report-${month.toFormat("yyyy-LL")}.pdf`,
    daysAgo,
    lines,
  });
  return [
    report(monthBefore, 36, [
      "Independent monitor's summary for Aldermere Campus Phase 2 (invented).",
      "Hall 2A: raised floor and containment complete; busway installation under way.",
      "HD-1: liquid-cooling manifold design frozen; CDU order placed.",
      "Programme: ready for service of Hall 2A holds within tolerance.",
    ]),
    report(lastMonth, 6, [
      "Independent monitor's summary for Aldermere Campus Phase 2 (invented).",
      "Chiller 3 arrived late; the N+1 chilled-water plant completes L3 commissioning two weeks behind.",
      "Generators 1-4 passed L2 witness tests; fuel polishing skid installed.",
      "Risk register reviewed: two risks rising, one closed, one became an issue.",
    ]),
    {
      key: "lender-pack",
      fields: { title: "Lender pack, quarterly drawdown", category: "lender_pack", period: `Q${Math.ceil(lastMonth.month / 3)} ${lastMonth.year}`, periodEnd: lastMonth.endOf("quarter").toISODate()!, audience: "investor" },
      file: "lender-pack-drawdown.pdf",
      daysAgo: 20,
      limitToInvestorOrganisation: true,
      lines: ["Drawdown request and cost position (invented figures).", "Budget walk: original, approved changes, current approved budget.", "Contingency held, drawn and remaining."],
    },
    {
      key: "certificate-switchboard",
      fields: { title: "Energisation certificate, Hall 2A main switchboard", category: "certificate", period: "", periodEnd: null, audience: "investor" },
      file: "energisation-certificate-hall-2a.pdf",
      daysAgo: 28,
      lines: ["Certificate of energisation (invented for the demo).", "Main switchboard MSB-2A energised after L2 inspection and testing."],
    },
    {
      key: "certificate-insurance",
      fields: { title: "Contractor's all-risks insurance certificate", category: "certificate", period: String(today.year), periodEnd: null, audience: "internal" },
      file: "insurance-certificate.pdf",
      daysAgo: 50,
      lines: ["Insurance certificate (invented; no real insurer).", "Works cover for Aldermere Campus Phase 2."],
    },
    {
      key: "technical-note-hd1",
      fields: { title: "Technical note: HD-1 liquid-cooling loop", category: "technical", period: "", periodEnd: null, audience: "investor" },
      file: "technical-note-hd1-cooling.pdf",
      daysAgo: 24,
      lines: ["Technical note (invented): direct-to-chip cooling for HD-1, 20 racks at up to 25 kW.", "Secondary loop supply 32 °C; CDUs in N+1."],
      second: { daysAgo: 3, note: "Revised after the CDU supplier's factory test.", lines: ["Technical note (invented), revision B: direct-to-chip cooling for HD-1.", "Secondary loop supply 30 °C after the factory test; CDUs in N+1."] },
    },
  ];
}

/** A few pages of invented text, marked as made for the demo. */
async function makePdf(title: string, lines: string[], pages = 3): Promise<Buffer> {
  const doc = await PDFDocument.create();
  doc.setTitle(title);
  doc.setProducer("Plumbline demo seed");
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  for (let p = 0; p < pages; p += 1) {
    const page = doc.addPage([595, 842]);
    page.drawText(title.replace(/[^\x20-\x7e\u00a0-\u00ff]/g, "-"), { x: 56, y: 770, size: 16, font: bold, color: rgb(0.1, 0.12, 0.15) });
    page.drawText("Kestrel Colocation · Aldermere Campus, Phase 2 · invented for the Plumbline demo", { x: 56, y: 748, size: 9, font, color: rgb(0.35, 0.37, 0.4) });
    lines.forEach((line, i) => page.drawText(line.replace(/[^\x20-\x7e\u00a0-\u00ff]/g, "-"), { x: 56, y: 700 - i * 20, size: 11, font }));
    page.drawText(`Page ${p + 1} of ${pages}`, { x: 56, y: 60, size: 9, font });
  }
  return Buffer.from(await doc.save());
}

export async function seedDocuments(db: Knex, projectSlug: string, opts: { mediaDir?: string; today?: DateTime } = {}): Promise<{ created: string[] }> {
  const project = (await db("projects").where({ slug: projectSlug }).first("id")) as { id: number } | undefined;
  if (!project) return { created: [] };
  const projectId = Number(project.id);
  const existing = await countOf(db("documents").where({ project_id: projectId }));
  if (existing > 0) return { created: [] };

  const lead = (await db("users").where({ email: "lead@kestrel.example" }).first("id", "name")) as { id: number; name: string } | undefined;
  const investor = (await db("users").where({ email: INVESTOR }).first("id", "organisation_id")) as { id: number; organisation_id: number | null } | undefined;
  if (!lead) return { created: [] };
  const actor: Actor = { user: { id: Number(lead.id), email: "lead@kestrel.example", name: String(lead.name), role: "lead" }, ip: null };

  const mediaDir = opts.mediaDir ?? seedMediaDir(db);
  const projects = createProjectsService(db);
  const uploads = createUploadArea(mediaDir);
  // Seeds may read any table: the organisations straight from theirs.
  const organisations = {
    ofUser: async (userId: number) => {
      const row = (await db("users as u").join("organisations as o", "o.id", "u.organisation_id").where("u.id", userId).first("o.id", "o.name")) as { id: number; name: string } | undefined;
      return row ? { id: Number(row.id), name: String(row.name) } : null;
    },
    namesOf: async (ids: readonly number[]) => new Map(((await db("organisations").whereIn("id", [...ids]).select("id", "name")) as Array<{ id: number; name: string }>).map((o) => [Number(o.id), String(o.name)])),
  };
  const documents = createDocumentsService({
    db,
    projects,
    accounts: createAccountsService({ db }),
    organisations,
    storage: createLocalDiskStorage(mediaDir),
    uploads,
    limits: { maxFileBytes: 50 * 1024 * 1024, maxPages: 1000 },
  });

  const today = (opts.today ?? DateTime.now()).setZone(TZ).startOf("day");
  const at = (daysAgo: number, hour = 10) => today.minus({ days: daysAgo }).set({ hour }).toJSDate();
  const created: string[] = [];
  const ids = new Map<string, { id: number; versions: number[] }>();
  for (const d of documentsFor(today)) {
    const organisationIds = d.limitToInvestorOrganisation && investor?.organisation_id ? [Number(investor.organisation_id)] : [];
    const file = await uploads.writeTemporary(await makePdf(d.fields.title, d.lines), d.file);
    const doc = await documents.create(projectSlug, { ...d.fields, organisationIds }, file, actor);
    // Dated as if uploaded over the last weeks (the seed's own rows: written directly).
    await db("documents").where({ id: doc.id }).update({ created_at: at(d.daysAgo), updated_at: at(d.second?.daysAgo ?? d.daysAgo) });
    await db("document_versions").where({ document_id: doc.id, number: 1 }).update({ uploaded_at: at(d.daysAgo) });
    await db("document_events").where({ document_id: doc.id }).update({ at: at(d.daysAgo) });
    const versions = [doc.latestVersion.id];
    if (d.second) {
      const next = await uploads.writeTemporary(await makePdf(`${d.fields.title} (revision B)`, d.second.lines, 4), d.file.replace(".pdf", "-rev-b.pdf"));
      const withSecond = await documents.addVersion(doc.id, { note: d.second.note }, next, actor);
      await db("document_versions").where({ document_id: doc.id, number: 2 }).update({ uploaded_at: at(d.second.daysAgo) });
      await db("document_events").where({ document_id: doc.id, field: "version" }).update({ at: at(d.second.daysAgo) });
      versions.push(withSecond.latestVersion.id);
    }
    ids.set(d.key, { id: doc.id, versions });
    created.push(`document “${d.fields.title}”`);
  }

  // The demo investor's history: they read the older papers, and last visited ten days ago, so
  // the newest report and the technical note's revision are new to them.
  if (investor) {
    const views: Array<[string, number, "view" | "download", number]> = [
      [`report-${today.minus({ months: 2 }).endOf("month").toFormat("yyyy-LL")}`, 0, "view", 34],
      [`report-${today.minus({ months: 2 }).endOf("month").toFormat("yyyy-LL")}`, 0, "download", 34],
      ["certificate-switchboard", 0, "view", 27],
      ["technical-note-hd1", 0, "view", 22],
      ["lender-pack", 0, "download", 12],
    ];
    for (const [key, versionIndex, kind, daysAgo] of views) {
      const doc = ids.get(key);
      if (!doc) continue;
      if (key === "lender-pack" && !investor.organisation_id) continue;
      await db("document_views").insert({
        project_id: projectId,
        document_id: doc.id,
        version_id: doc.versions[versionIndex],
        user_id: Number(investor.id),
        kind,
        at: at(daysAgo, 14),
        address: "192.0.2.10",
        agent: "Mozilla/5.0 (demo history)",
      });
    }
    await db("document_visits").insert({ project_id: projectId, user_id: Number(investor.id), last_visit_at: at(10, 15) }).onConflict(["project_id", "user_id"]).merge();
    created.push(`${views.length} document views by the demo investor`);
  }
  return { created };
}
