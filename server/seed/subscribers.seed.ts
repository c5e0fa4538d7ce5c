import type { Knex } from "knex";
import { CONSENT, type Frequency, type Interest, type SubscriberStatus, type Topics } from "#shared/schemas/subscribers.ts";
import { hashAddress } from "../subscribers/subscribers.tokens.ts";
import { topicsKey } from "../subscribers/subscribers.topics.ts";

const DAY = 24 * 60 * 60 * 1000;

// Invented people at reserved example domains (RFC 2606), for the demo only.
const PEOPLE: Array<[name: string, organisation: string | null, interest: Interest]> = [
  ["Rowan Achterberg", "Fenwick Data Services", "prospect"],
  ["Imogen Saltmarsh", "Corrow Analytics", "prospect"],
  ["Tobias Quayle", "Brightwater Media Group", "prospect"],
  ["Anjali Verhoeven", "Lowmoor Clinical Systems", "prospect"],
  ["Declan Ormsby", "Tamsin Freight", "prospect"],
  ["Hester Lindqvist", "Skelwith Games", "prospect"],
  ["Marcus Oduya", "Parrfield Insurance", "prospect"],
  ["Sunniva Pell", "Greyhope Research", "prospect"],
  ["Callum Tregarthen", "Ashby Render Farm", "prospect"],
  ["Yusra Kettleborough", "Northlight Payments", "prospect"],
  ["Felix Amberley", "Halcombe Hosting", "prospect"],
  ["Odette Marchetti", null, "investor"],
  ["Benedikt Roper", "Sable Point Capital", "investor"],
  ["Priyanka Holloway", "Whitcombe Pension Trust", "investor"],
  ["Gideon Farrelly", "Meridian Vale Partners", "investor"],
  ["Lorna Castellanos", "Eastmere Infrastructure Fund", "investor"],
  ["Ravi Stonehouse", null, "investor"],
  ["Ingrid Mallory", "Tidewater Lending", "investor"],
  ["Cormac Ellery", "Harrowgate Family Office", "investor"],
  ["Wren Delacroix", "The Aldermere Courier", "press"],
  ["Samuel Achebe-Ward", "Data Hall Weekly", "press"],
  ["Petra Llewellyn", "Regional Business Review", "press"],
  ["Oskar Brannigan", "Critical Build Journal", "press"],
  ["Maeve Thornbury", null, "press"],
  ["Jasper Whitcliffe", "Infrastructure Desk", "press"],
  ["Agnes Pemberton", null, "neighbour"],
  ["Hamish Ockenden", "Aldermere Residents' Association", "neighbour"],
  ["Leonie Fairbrother", null, "neighbour"],
  ["Ezra Blackwood", null, "neighbour"],
  ["Constance Mireault", "Aldermere Primary School", "neighbour"],
  ["Dominic Asheworth", null, "neighbour"],
  ["Thea Valcourt", null, "neighbour"],
  ["Niall Greenhalgh", "Mill Lane Allotments", "neighbour"],
  ["Beatrix Oyelaran", null, "neighbour"],
  ["Ambrose Kilbride", null, "neighbour"],
  ["Saoirse Dunmore", "Fenwick Data Services", "prospect"],
  ["Lucian Hartigan", "Corrow Analytics", "prospect"],
  ["Freya Nakamura-Bell", "Brightwater Media Group", "press"],
  ["Otto Prendergast", null, "neighbour"],
  ["Clementine Rusk", "Sable Point Capital", "investor"],
];

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
    const date = (days: number) => new Date(now.getTime() + days * DAY).toISOString().slice(0, 10);
    await db("enquiries").insert([
      {
        project_id: projectId,
        kind: "capacity",
        name: "Rowan Achterberg",
        email: "rowan.achterberg@example.com",
        organisation: "Fenwick Data Services",
        message: "We are planning a migration out of our current hall and need to know whether HD-1 will take our GPU racks.",
        racks: 12,
        kw_per_rack: 18,
        needed_by: date(150),
        status: "new",
        created_at: new Date(now.getTime() - 1 * DAY),
        updated_at: new Date(now.getTime() - 1 * DAY),
      },
      {
        project_id: projectId,
        kind: "visit",
        name: "Anjali Verhoeven",
        email: "anjali.verhoeven@example.org",
        organisation: "Lowmoor Clinical Systems",
        message: "Two of us from infrastructure and one from procurement.",
        preferred_dates: JSON.stringify([date(9), date(16)]),
        party_size: 3,
        rules_accepted_at: new Date(now.getTime() - 4 * DAY),
        status: "contacted",
        owner_id: marketing ? marketing.id : null,
        notes: "Called back; induction booked for the first date, subject to the lead's approval.",
        created_at: new Date(now.getTime() - 4 * DAY),
        updated_at: new Date(now.getTime() - 2 * DAY),
      },
      {
        project_id: projectId,
        kind: "general",
        name: "Hamish Ockenden",
        email: "hamish.ockenden@example.net",
        organisation: "Aldermere Residents' Association",
        message: "Will the generator testing happen at weekends? Residents on Mill Lane would like to know the hours.",
        status: "closed",
        owner_id: marketing ? marketing.id : null,
        notes: "Answered: monthly tests on weekday mornings only, 10:00 to 11:00.",
        created_at: new Date(now.getTime() - 20 * DAY),
        updated_at: new Date(now.getTime() - 18 * DAY),
      },
    ]);
    created.push("3 enquiries");
  }
  return { created };
}
