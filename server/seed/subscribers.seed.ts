import type { Knex } from "knex";
import { z } from "zod";
import { EnquiryKindSchema, EnquiryStatusSchema } from "#shared/schemas/enquiries.ts";
import { CONSENT, InterestSchema, type Frequency, type SubscriberStatus, type Topics } from "#shared/schemas/subscribers.ts";
import { hashAddress } from "../subscribers/subscribers.tokens.ts";
import { topicsKey } from "../subscribers/subscribers.topics.ts";
import demoSubscribers from "./demo-subscribers.json" with { type: "json" };

const DAY = 24 * 60 * 60 * 1000;

/**
 * The demo's people and enquiries are content, not code: they live in a data file, checked here.
 * The people are invented, at reserved example domains (RFC 2606), for the demo only. An
 * enquiry's dates are days before (or, for what it asks for, after) the seed's `now`.
 */
const DemoSubscribersSchema = z.strictObject({
  people: z.array(z.tuple([z.string(), z.string().nullable(), InterestSchema])),
  enquiries: z.array(
    z.strictObject({
      daysAgo: z.number(),
      updatedDaysAgo: z.number(),
      kind: EnquiryKindSchema,
      name: z.string(),
      email: z.string(),
      organisation: z.string(),
      message: z.string(),
      racks: z.number().optional(),
      kwPerRack: z.number().optional(),
      neededInDays: z.number().optional(),
      preferredInDays: z.array(z.number()).optional(),
      partySize: z.number().optional(),
      rulesAcceptedDaysAgo: z.number().optional(),
      status: EnquiryStatusSchema,
      ownedByMarketing: z.boolean().optional(),
      notes: z.string().optional(),
    }),
  ),
});
const { people: PEOPLE, enquiries: ENQUIRIES } = DemoSubscribersSchema.parse(demoSubscribers);

const DOMAINS = ["example.com", "example.org", "example.net"];
const FREQUENCIES: Frequency[] = ["weekly", "weekly", "monthly", "immediate"];
const TOPICS: Array<Topics | null> = [null, null, { areas: ["Hall 2A"], systems: ["cooling"] }, null, { areas: [], systems: ["power", "fuel"] }, { areas: ["HD-1"], systems: [] }, null, { areas: ["Plant yard"], systems: ["cooling", "power"] }];

function addressOf(name: string, i: number): string {
  const local = name.toLowerCase().replace(/[^a-z ]/g, "").trim().replace(/\s+/g, ".");
  return `${local}@${DOMAINS[i % DOMAINS.length]}`;
}

/**
 * The demo's subscribers and enquiries (DESIGN.md's invented scenario): 40 people across
 * the four interests, most confirmed, a few waiting to confirm, two who left, one whose
 * mail bounced (and is suppressed), the demo investor's own digest, and three enquiries.
 * Idempotent: a project that has subscribers (or enquiries) already is left alone.
 */
export async function seedSubscribers(db: Knex, projectSlug: string, now: Date = new Date()): Promise<{ created: string[] }> {
  const created: string[] = [];
  const project = await db("projects").where({ slug: projectSlug }).first("id");
  if (!project) return { created };
  const projectId = Number(project.id);

  const has = await db("subscribers").where({ project_id: projectId }).first("id");
  if (!has) {
    const rows = PEOPLE.map(([name, organisation, interest], i) => {
      const email = addressOf(name, i);
      const status: SubscriberStatus = i === 7 ? "bounced" : i === 12 || i === 27 ? "unsubscribed" : i >= 36 ? "pending" : "confirmed";
      const consentAt = new Date(now.getTime() - (80 - i * 2) * DAY);
      const topics = TOPICS[i % TOPICS.length]!;
      return {
        project_id: projectId,
        email,
        email_hash: hashAddress(email),
        name,
        organisation,
        interest,
        audience: "public",
        frequency: FREQUENCIES[i % FREQUENCIES.length]!,
        topics: topics ? JSON.stringify(topics) : null,
        topics_key: topicsKey(topics),
        status,
        status_changed_at: status === "confirmed" || status === "pending" ? null : new Date(now.getTime() - 5 * DAY),
        consent_at: consentAt,
        consent_ip: `192.0.2.${10 + i}`,
        consent_version: CONSENT.version,
        consent_source: "subscribe form",
        confirm_nonce: status === "pending" ? `demo-nonce-${i}` : null,
        // Recent, so the 30-day purge leaves the demo's unconfirmed rows in place for a while.
        pending_since: status === "pending" ? new Date(now.getTime() - (i - 34) * DAY) : null,
        confirmed_at: status === "pending" ? null : new Date(consentAt.getTime() + 20 * 60 * 1000),
        confirm_ip: status === "pending" ? null : `192.0.2.${10 + i}`,
        unsubscribed_at: status === "unsubscribed" ? new Date(now.getTime() - 5 * DAY) : null,
      };
    });
    await db("subscribers").insert(rows);
    const bounced = rows.find((r) => r.status === "bounced")!;
    await db("suppressions").insert({ email_hash: bounced.email_hash, reason: "bounced", source: "smtp-550" }).onConflict("email_hash").ignore();

    const investor = await db("users").where({ email: "investor@harbourfund.example" }).first("id", "name", "email");
    if (investor) {
      await db("subscribers").insert({
        project_id: projectId,
        user_id: investor.id,
        email: investor.email,
        email_hash: hashAddress(investor.email),
        name: investor.name,
        organisation: "Harbour Fund (invented)",
        interest: "investor",
        audience: "investor",
        frequency: "monthly",
        topics: null,
        topics_key: "all",
        status: "confirmed",
        consent_at: new Date(now.getTime() - 60 * DAY),
        consent_ip: "192.0.2.200",
        consent_version: CONSENT.version,
        consent_source: "investor room (signed in)",
        confirmed_at: new Date(now.getTime() - 60 * DAY),
      });
    }
    created.push(`${rows.length + (investor ? 1 : 0)} subscribers`);
  }

  const hasEnquiries = await db("enquiries").where({ project_id: projectId }).first("id");
  if (!hasEnquiries) {
    const marketing = await db("users").where({ email: "marketing@kestrel.example" }).first("id");
    const at = (days: number) => new Date(now.getTime() + days * DAY);
    const date = (days: number) => at(days).toISOString().slice(0, 10);
    // A column the demo enquiry does not fill is left out of its row (the table's default), as a form would.
    await db("enquiries").insert(
      ENQUIRIES.map((e) => ({
        project_id: projectId,
        kind: e.kind,
        name: e.name,
        email: e.email,
        organisation: e.organisation,
        message: e.message,
        ...(e.racks === undefined ? {} : { racks: e.racks, kw_per_rack: e.kwPerRack, needed_by: date(e.neededInDays!) }),
        ...(e.preferredInDays === undefined ? {} : { preferred_dates: JSON.stringify(e.preferredInDays.map(date)), party_size: e.partySize, rules_accepted_at: at(-e.rulesAcceptedDaysAgo!) }),
        status: e.status,
        ...(e.ownedByMarketing ? { owner_id: marketing ? marketing.id : null } : {}),
        ...(e.notes === undefined ? {} : { notes: e.notes }),
        created_at: at(-e.daysAgo),
        updated_at: at(-e.updatedDaysAgo),
      })),
    );
    created.push(`${ENQUIRIES.length} enquiries`);
  }
  return { created };
}
