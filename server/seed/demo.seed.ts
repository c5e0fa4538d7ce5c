import type { Knex } from "knex";
import { seedAccounts } from "./accounts.seed.ts";
import { DEMO_USERS } from "./demo-users.ts";
import { seedSubscribers } from "./subscribers.seed.ts";
import { seedDigests } from "./digests.seed.ts";
import { seedProgramme } from "./programme.seed.ts";
import { seedMedia } from "./media.seed.ts";
import { seedPosts } from "./posts.seed.ts";
import { seedFacility } from "./facility.seed.ts";
import { seedRecord } from "./record.seed.ts";
import { seedDocuments } from "./documents.seed.ts";
import { seedReports } from "./reports.seed.ts";
import { seedSitePlan } from "./site-plan.seed.ts";
import { countOf } from "../db/rows.ts";

export const DEMO_PROJECT_SLUG = "aldermere-phase-2";

/**
 * Seeds the invented demo scenario (DESIGN.md). Idempotent: rows that exist are left as
 * they are, so a second run changes nothing.
 */
export async function seedDemo(db: Knex, opts: { password: string }): Promise<{ created: string[] }> {
  const created: string[] = await seedAccounts(db, DEMO_USERS, opts.password);
  if (!(await db("projects").where({ slug: DEMO_PROJECT_SLUG }).first())) {
    await db("projects").insert({
      slug: DEMO_PROJECT_SLUG,
      name: "Aldermere Campus, Phase 2",
      operator_name: "Kestrel Colocation",
      location_label: "Aldermere Campus (an invented site)",
      time_zone: "Europe/London",
      description:
        "Phase 2 adds Hall 2A (48 racks, 480 kW IT), the high-density suite HD-1 (20 racks at up to 25 kW, 500 kW) and, in a later stage, Hall 2B (48 racks, 480 kW), with the chiller, generator, fuel and UPS plant that serves them.",
      postal_address: "1 Example Way, Aldermere, AL1 0XX (invented address)",
      currency: "GBP",
      tolerance_working_days: 5,
      behind_working_days: 15,
      weekend_days: "[6,7]",
      holidays: JSON.stringify(["2026-01-01", "2026-04-03", "2026-04-06", "2026-05-04", "2026-05-25", "2026-08-31", "2026-12-25", "2026-12-28", "2027-01-01", "2027-03-26", "2027-03-29", "2027-05-03", "2027-05-31", "2027-08-30", "2027-12-27", "2027-12-28"]),
      visits_offered: true,
    });
    created.push(`project ${DEMO_PROJECT_SLUG}`);
  }
  // The programme is seeded once, into a project that has none: a second run, or a
  // programme the demo's users have since edited, is left alone.
  const project = await db("projects").where({ slug: DEMO_PROJECT_SLUG }).first("id");
  const existing = await countOf(db("milestones").where({ project_id: project.id }));
  if (existing === 0) {
    const lead = await db("users").where({ email: "lead@kestrel.example" }).first("id");
    const count = await seedProgramme(db, Number(project.id), { byUserId: lead ? Number(lead.id) : null });
    created.push(`programme of ${count} milestones`);
  }
  // Illustrative photos (after the programme, so they can be tagged with its milestones).
  const photos = await seedMedia(db, Number(project.id));
  if (photos.created > 0) created.push(`${photos.created} illustrative photos in ${(photos.ms / 1000).toFixed(1)} s`);
  if (photos.rewritten > 0) created.push(`${photos.rewritten} photo originals rewritten without their location`);
  // Updates and the photo story (after the photos and the programme they show).
  created.push(...(await seedPosts(db, DEMO_PROJECT_SLUG)).created);
  // The facility (after the programme its blocks depend on, and the photos and updates it tags).
  const facilityLead = await db("users").where({ email: "lead@kestrel.example" }).first("id");
  created.push(...(await seedFacility(db, Number(project.id), { byUserId: facilityLead ? Number(facilityLead.id) : null })).created);
  // The site plan: its areas are named as the programme's milestones and the photos' area tags are.
  created.push(...(await seedSitePlan(db, Number(project.id), { byUserId: facilityLead ? Number(facilityLead.id) : null })).created);
  // The investor's record: organisations, risks and issues, decisions, budget changes (after the programme and facility they link).
  created.push(...(await seedRecord(db, Number(project.id), { password: opts.password })).created);
  created.push(...(await seedSubscribers(db, DEMO_PROJECT_SLUG)).created);
  created.push(...(await seedDigests(db, DEMO_PROJECT_SLUG)).created);
  // The document library, after the record seed (its organisations limit the lender pack).
  created.push(...(await seedDocuments(db, DEMO_PROJECT_SLUG)).created);
  // The last two monthly reports, issued through the reports service (their PDFs join the library).
  created.push(...(await seedReports(db, DEMO_PROJECT_SLUG)).created);
  return { created };
}
