import type { Knex } from "knex";
import { DateTime } from "luxon";
import { addDays } from "#shared/domain/calendar.ts";
import type { Role } from "#shared/schemas/common.ts";
import type { ActionStatus, RecordAudience, RiskCategory, RiskStatus } from "#shared/schemas/risks.ts";
import { seedAccounts } from "./accounts.seed.ts";
import { demoAnchor } from "./programme.seed.ts";

/**
 * The investor's record of the invented demo scenario (issue 12): investor organisations, the
 * risks and issues register, decisions needed and budget changes with the contingency. Every
 * name and figure is invented; documents are seeded by the documents' own seed.
 *
 * Dates are placed on the week the seed runs in (the programme's anchor: the Monday of this
 * week), so the register's trends, the decisions' days left and a digest's window read as they
 * should on the day the demo is shown: the level changes that make two risks rise and one fall
 * were made in the last 30 days, a decision is overdue and another is due in three weeks.
 *
 * Idempotent like the other seeds: organisations and accounts are added when missing; the
 * register, the decisions and the budget changes are written once, into a project that has none.
 */

const TZ = "Europe/London";
const LEAD = "lead@kestrel.example";
const ADMIN = "admin@kestrel.example";

/** Investor organisations, and which demo accounts belong to them. */
const ORGANISATIONS = [
  // The demo investor's fund (her address is at harbourfund.example).
  { name: "Harbourfund Infrastructure Partners", members: ["investor@harbourfund.example"] },
  // The lender: a second investor account, so a document limited to one organisation has a reader it is hidden from.
  { name: "Northmoor Bank (lender)", members: ["credit@northmoorbank.example"] },
] as const;

/** Accounts of the record's demo that are not one of the four demo sign-ins (same password). */
const RECORD_USERS: ReadonlyArray<{ email: string; name: string; role: Role }> = [{ email: "credit@northmoorbank.example", name: "Tomas Avery", role: "investor" }];

/** Days relative to the anchor; hours on those days in the project's time zone. */
type At = readonly [days: number, hour: number];

interface SeedRisk {
  key: string;
  title: string;
  description: string;
  cause: string;
  effect: string;
  category: RiskCategory;
  owner: "lead" | "admin";
  /** Levels as they were when entered; `moves` change them since. */
  likelihood: number;
  impact: number;
  cost: { min: number; mostLikely: number; max: number; probability: number } | null;
  scheduleDays: number | null;
  audience: RecordAudience;
  created: At;
  /** Level changes, oldest first: each an event (from the level before). */
  moves?: Array<{ at: At; likelihood?: number; impact?: number; note: string }>;
  /** A status other than open, and when it changed. */
  status?: { to: Exclude<RiskStatus, "open">; at: At; note: string };
  milestones?: string[];
  blocks?: string[];
  systems?: string[];
  mitigations?: Array<{ description: string; owner: "lead" | "admin"; due: number | null; status: ActionStatus }>;
}

/** £ in minor units (pence). */
const gbp = (pounds: number) => Math.round(pounds * 100);

const RISKS: SeedRisk[] = [
  {
    key: "chiller",
    title: "Late delivery of the remaining chillers",
    description: "Chillers 3 and 5 are not yet on site; the cooling plant cannot reach N+1 until all five are set.",
    cause: "Chiller 3 failed its first factory witness test on capacity; shipping slots are tight.",
    effect: "L3 start-up of the cooling plant and the L4 tests behind it move; Hall 2A ready for service moves with them.",
    category: "supply_chain",
    owner: "lead",
    likelihood: 3,
    impact: 4,
    cost: { min: gbp(15_000), mostLikely: gbp(40_000), max: gbp(90_000), probability: 0.5 },
    scheduleDays: 15,
    audience: "investor",
    created: [-150, 10],
    moves: [{ at: [-40, 11], likelihood: 4, note: "Chiller 3 failed its factory witness test on capacity." }],
    status: { to: "became_issue", at: [-6, 16], note: "Chiller 3 arrived late, held at the port for ten days: the risk has happened." },
    milestones: ["Chillers delivered", "L3 start-up"],
    systems: ["Chillers"],
    mitigations: [
      { description: "Witness the capacity re-test at the factory", owner: "lead", due: -45, status: "done" },
      { description: "Book a second shipping slot for Chillers 3 and 5", owner: "admin", due: -30, status: "done" },
    ],
  },
  {
    key: "ist",
    title: "Integrated systems test slips behind the generator load bank test",
    description: "The L5 test needs every generator proven on a load bank first; the load bank hire is shared with another site.",
    cause: "Load bank availability and the late generator set.",
    effect: "The L5 integrated systems test and both ready-for-service dates move.",
    category: "programme",
    owner: "lead",
    likelihood: 2,
    impact: 4,
    cost: null,
    scheduleDays: 10,
    audience: "investor",
    created: [-120, 9],
    moves: [
      { at: [-21, 10], likelihood: 3, note: "The load bank supplier moved our hire by a week." },
      { at: [-6, 14], likelihood: 4, note: "Generator 3 delivered two weeks late: its load bank test follows the others." },
    ],
    milestones: ["Generator commissioning", "L5 integrated systems test"],
    mitigations: [
      { description: "Hold a second load bank supplier on standby", owner: "lead", due: 14, status: "in_progress" },
      { description: "Re-sequence the generator tests so sets 1 and 2 go first", owner: "lead", due: 7, status: "planned" },
    ],
  },
  {
    key: "copper",
    title: "Copper and cable prices rise before the HD-1 busbar order",
    description: "The HD-1 dual busbar is priced but not yet ordered; copper has risen since the tender.",
    cause: "Metal prices move faster than the order can be placed.",
    effect: "A higher busbar price, drawn from the contingency.",
    category: "cost",
    owner: "admin",
    likelihood: 3,
    impact: 2,
    cost: { min: gbp(20_000), mostLikely: gbp(55_000), max: gbp(120_000), probability: 0.6 },
    scheduleDays: null,
    audience: "investor",
    created: [-90, 9],
    moves: [{ at: [-12, 11], impact: 3, note: "The supplier's price holds for two more weeks only." }],
    milestones: ["HD-1 high-density containment"],
    blocks: ["HD-1"],
    mitigations: [{ description: "Place the busbar order with a fixed copper price", owner: "admin", due: 10, status: "in_progress" }],
  },
  {
    key: "liquid",
    title: "Liquid-cooling demand in HD-1 beyond the secondary loop's design",
    description: "A prospective HD-1 client asks about direct-to-chip cooling for some racks.",
    cause: "Rack densities in the market are rising.",
    effect: "Rework of the secondary loop if it is not provided for now.",
    category: "technical",
    owner: "lead",
    likelihood: 4,
    impact: 3,
    cost: { min: gbp(30_000), mostLikely: gbp(80_000), max: gbp(160_000), probability: 0.4 },
    scheduleDays: 20,
    audience: "investor",
    created: [-100, 9],
    moves: [{ at: [-15, 10], likelihood: 3, note: "Tee-offs for a secondary loop approved (change C-002): rework is now less likely." }],
    blocks: ["HD-1"],
    milestones: ["HD-1 ready for service"],
  },
  {
    key: "anchor",
    title: "Anchor client's HD-1 reservation not converted to a contract",
    description: "The reservation of ten HD-1 racks lapses at the end of next quarter.",
    cause: "The client's own board approval is pending.",
    effect: "HD-1 income starts later than the business case assumes.",
    category: "commercial",
    owner: "admin",
    likelihood: 2,
    impact: 4,
    cost: null,
    scheduleDays: null,
    audience: "internal",
    created: [-60, 9],
    blocks: ["HD-1"],
  },
  {
    key: "lifting",
    title: "Lifting operations over the live plant yard",
    description: "Chillers and generators are lifted over the plant yard while the HV switchgear is live.",
    cause: "Plant deliveries after the energy centre was energised.",
    effect: "A dropped load near live equipment.",
    category: "safety",
    owner: "lead",
    likelihood: 2,
    impact: 5,
    cost: null,
    scheduleDays: null,
    audience: "investor",
    created: [-130, 9],
    status: { to: "closed", at: [-8, 15], note: "The last heavy lift is done; the remaining chillers go in from the road side." },
    systems: ["Chillers"],
    mitigations: [{ description: "Lift plans reviewed and exclusion zones marked for every heavy lift", owner: "lead", due: -10, status: "done" }],
  },
  {
    key: "permit",
    title: "Generator emissions permit limits test running hours",
    description: "The draft permit caps the generators' running hours in a year, tests included.",
    cause: "The local air-quality conditions of the permit.",
    effect: "Fewer hours for the load bank and integrated tests than planned.",
    category: "regulatory",
    owner: "admin",
    likelihood: 2,
    impact: 3,
    cost: null,
    scheduleDays: 5,
    audience: "investor",
    created: [-110, 9],
    milestones: ["Generator commissioning"],
    systems: ["Standby generators"],
  },
  {
    key: "road",
    title: "Access road shared with the neighbouring site's works",
    description: "The estate road is shared with a neighbour's groundworks for the next two months.",
    cause: "Both sites' deliveries use the one estate road.",
    effect: "Delivery slots are lost on some days.",
    category: "other",
    owner: "lead",
    likelihood: 3,
    impact: 2,
    cost: null,
    scheduleDays: 3,
    audience: "internal",
    created: [-50, 9],
  },
];

/** The issue the late chiller became. */
const CHILLER_ISSUE = {
  title: "Chiller 3 delivered late",
  impactNow: "Chiller 3 arrived two weeks late and is not yet installed; the cooling plant is short of N+1 until it and Chiller 5 are set.",
  action: "Install Chillers 3 and 5 in one crane visit and start their L2 checks the same week.",
  due: 10,
};

interface SeedDecision {
  title: string;
  question: string;
  background: string;
  options: Array<{ label: string; consequence: string; cost: number | null }>;
  recommendedOption: number | null;
  recommendation: string;
  decider: string;
  neededBy: number;
  audience: RecordAudience;
  created: At;
  milestones: string[];
  risks: string[];
  outcome?: { chosenOption: number; text: string; decidedBy: string; decidedOn: number; at: At };
}

const DECISIONS: SeedDecision[] = [
  {
    title: "Approve the liquid-cooling fit-out for HD-1",
    question: "Should HD-1 be fitted now with a secondary liquid-cooling loop for direct-to-chip racks?",
    background: "A prospective HD-1 client asks for direct-to-chip cooling for some racks. The tee-offs are already provided (change C-002); the loop itself is not.",
    options: [
      { label: "Fit the secondary loop now", consequence: "HD-1 is offered liquid-ready from its first day; the HD-1 ready date holds.", cost: gbp(310_000) },
      { label: "Fit it at a client's request", consequence: "No spend now; a later fit-out in a live suite takes about six weeks.", cost: 0 },
    ],
    recommendedOption: 0,
    recommendation: "Fit it now: a later fit-out in a live suite costs more and disturbs the first clients.",
    decider: "Investor committee",
    neededBy: 21,
    audience: "investor",
    created: [-10, 11],
    milestones: ["HD-1 high-density containment", "HD-1 ready for service"],
    risks: ["liquid"],
  },
  {
    title: "Release the second load bank booking",
    question: "Should a second load bank be booked so the generator tests do not wait on the shared one?",
    background: "If not decided by the date below, the generator commissioning and the L5 test move by about a week.",
    options: [
      { label: "Book a second load bank", consequence: "Generator tests run in parallel; the L5 date holds.", cost: gbp(18_000) },
      { label: "Wait for the shared load bank", consequence: "No spend; the L5 test and both ready dates move by about a week.", cost: null },
    ],
    recommendedOption: 0,
    recommendation: "Book the second load bank.",
    decider: "Project board",
    neededBy: -4,
    audience: "investor",
    created: [-18, 10],
    milestones: ["Generator commissioning", "L5 integrated systems test"],
    risks: ["ist"],
  },
  {
    title: "Draw on the contingency for the Chiller 3 re-test and port storage",
    question: "Should the cost of Chiller 3's re-test witness visit and its port storage be met from the contingency?",
    background: "The supplier meets the re-test itself; our witness visit and ten days' port storage are ours.",
    options: [
      { label: "Meet it from the contingency", consequence: "The works budget is unchanged; the contingency remaining falls.", cost: gbp(38_500) },
      { label: "Claim it from the supplier first", consequence: "A claim may take months and the storage must be paid now.", cost: null },
    ],
    recommendedOption: 0,
    recommendation: "Meet it from the contingency and pursue the supplier separately.",
    decider: "Project board",
    neededBy: -30,
    audience: "investor",
    created: [-45, 10],
    milestones: ["Chillers delivered"],
    risks: ["chiller"],
    outcome: { chosenOption: 0, text: "Approved: met from the contingency; the claim against the supplier goes ahead separately.", decidedBy: "Project board", decidedOn: -36, at: [-35, 16] },
  },
];

interface SeedChange {
  description: string;
  detail: string;
  amount: number;
  status: "proposed" | "approved" | "rejected";
  approvedBy: string | null;
  /** Days relative to the anchor; the status event is recorded that day. */
  decidedOn: number | null;
  drawsOnContingency: boolean;
  audience: RecordAudience;
  created: At;
  milestones: string[];
  risks: string[];
}

const CHANGES: SeedChange[] = [
  {
    description: "HD-1 secondary loop tee-offs for future liquid cooling",
    detail: "Valved tee-offs on the HD-1 chilled-water mains so a secondary loop can be added without draining the system.",
    amount: gbp(126_000),
    status: "approved",
    approvedBy: "Investor committee",
    decidedOn: -60,
    drawsOnContingency: false,
    audience: "investor",
    created: [-70, 10],
    milestones: ["HD-1 high-density containment"],
    risks: ["liquid"],
  },
  {
    description: "Chiller 3 re-test witness visit and port storage",
    detail: "Our witness visit to the factory re-test and ten days' storage at the port.",
    amount: gbp(38_500),
    status: "approved",
    approvedBy: "Project board",
    decidedOn: -36,
    drawsOnContingency: true,
    audience: "investor",
    created: [-40, 10],
    milestones: ["Chillers delivered"],
    risks: ["chiller"],
  },
  {
    description: "LED lighting controls in the plant rooms (saving)",
    detail: "A simpler lighting control scheme in the plant rooms, agreed with the electrical contractor.",
    amount: gbp(-24_000),
    status: "approved",
    approvedBy: "Priya Castell, project lead",
    decidedOn: -12,
    drawsOnContingency: false,
    audience: "internal",
    created: [-20, 10],
    milestones: [],
    risks: [],
  },
  {
    description: "Replacement anti-vibration mounts for Fan 5",
    detail: "The first mounts were the wrong rating; the supplier disputes who pays.",
    amount: gbp(9_800),
    status: "proposed",
    approvedBy: null,
    decidedOn: null,
    drawsOnContingency: true,
    audience: "internal",
    created: [-5, 10],
    milestones: ["Supply fans installed"],
    risks: [],
  },
  {
    description: "Second staffed lane at the gatehouse",
    detail: "A second lane for deliveries during the fit-out peak.",
    amount: gbp(85_000),
    status: "rejected",
    approvedBy: null,
    decidedOn: -25,
    drawsOnContingency: false,
    audience: "investor",
    created: [-30, 10],
    milestones: ["Perimeter fence"],
    risks: [],
  },
];

/** The contingency held in the approved budget (the original budget is the milestones' budgets, £5.05 million). */
const CONTINGENCY_HELD = gbp(400_000);

const pad = (n: number) => String(n).padStart(3, "0");

export async function seedRecord(db: Knex, projectId: number, opts: { password: string; today?: string }): Promise<{ created: string[] }> {
  const created: string[] = await seedAccounts(db, RECORD_USERS, opts.password);
  const anchor = demoAnchor(opts.today);
  const date = (days: number) => addDays(anchor, days);
  const instant = ([days, hour]: At) => DateTime.fromISO(`${date(days)}T${String(hour).padStart(2, "0")}:00`, { zone: TZ }).toJSDate();

  for (const o of ORGANISATIONS) {
    let org = await db("organisations").where({ name: o.name }).first("id");
    if (!org) {
      const [id] = await db("organisations").insert({ name: o.name });
      org = { id };
      created.push(`organisation ${o.name}`);
    }
    // An account someone has since given another organisation is left as it is.
    await db("users").whereIn("email", [...o.members]).where({ role: "investor" }).whereNull("organisation_id").update({ organisation_id: org.id });
  }

  const users = new Map(((await db("users").whereIn("email", [LEAD, ADMIN]).select("id", "email")) as Array<{ id: number; email: string }>).map((u) => [u.email, Number(u.id)]));
  const lead = users.get(LEAD);
  const admin = users.get(ADMIN);
  if (lead === undefined || admin === undefined) return { created };
  const owner = (o: "lead" | "admin") => (o === "lead" ? lead : admin);
  const byName = async (table: string, names: readonly string[]) => {
    const rows = (await db(table).where({ project_id: projectId }).select("id", "name")) as Array<{ id: number; name: string }>;
    return names.map((n) => rows.find((r) => r.name.startsWith(n))).filter((r): r is { id: number; name: string } => r !== undefined).map((r) => Number(r.id));
  };

  if (!(await db("risks").where({ project_id: projectId }).first("id"))) {
    await db.transaction(async (trx) => {
      const riskIds = new Map<string, number>();
      const events: Array<Record<string, unknown>> = [];
      const event = (riskId: number, field: string, from: string | null, to: string | null, at: At, by: number, note: string | null = null) =>
        events.push({ project_id: projectId, risk_id: riskId, field, from_value: from, to_value: to, at: instant(at), by_user_id: by, note });
      for (const [i, r] of RISKS.entries()) {
        const levels = { likelihood: r.likelihood, impact: r.impact };
        for (const m of r.moves ?? []) Object.assign(levels, m.likelihood === undefined ? {} : { likelihood: m.likelihood }, m.impact === undefined ? {} : { impact: m.impact });
        const last = r.status?.at ?? r.moves?.at(-1)?.at ?? r.created;
        const [id] = await trx("risks").insert({
          project_id: projectId,
          kind: "risk",
          number: i + 1,
          title: r.title,
          description: r.description,
          cause: r.cause,
          effect: r.effect,
          category: r.category,
          owner_id: owner(r.owner),
          likelihood: levels.likelihood,
          impact: levels.impact,
          cost_min: r.cost?.min ?? null,
          cost_most_likely: r.cost?.mostLikely ?? null,
          cost_max: r.cost?.max ?? null,
          probability: r.cost?.probability ?? null,
          schedule_days: r.scheduleDays,
          status: r.status?.to ?? "open",
          audience: r.audience,
          impact_now: "",
          action: "",
          version: 1 + (r.moves?.length ?? 0) + (r.status ? 1 : 0),
          created_at: instant(r.created),
          updated_at: instant(last),
        });
        const riskId = Number(id);
        riskIds.set(r.key, riskId);
        event(riskId, "created", null, `R-${pad(i + 1)}`, r.created, owner(r.owner));
        const was = { likelihood: r.likelihood, impact: r.impact };
        for (const m of r.moves ?? []) {
          for (const field of ["likelihood", "impact"] as const) {
            const to = m[field];
            if (to === undefined) continue;
            event(riskId, field, String(was[field]), String(to), m.at, owner(r.owner), m.note);
            was[field] = to;
          }
        }
        if (r.status) event(riskId, "status", "open", r.status.to, r.status.at, owner(r.owner), r.status.note);
        for (const [table, column, names] of [
          ["risk_milestones", "milestone_id", await byName("milestones", r.milestones ?? [])],
          ["risk_blocks", "block_id", await byName("capacity_blocks", r.blocks ?? [])],
          ["risk_systems", "system_id", await byName("plant_systems", r.systems ?? [])],
        ] as const) {
          if (names.length > 0) await trx(table).insert(names.map((linked) => ({ risk_id: riskId, [column]: linked })));
        }
        for (const [k, m] of (r.mitigations ?? []).entries()) {
          await trx("risk_mitigations").insert({ risk_id: riskId, description: m.description, owner_id: owner(m.owner), due_date: m.due === null ? null : date(m.due), status: m.status, sort_order: k + 1, created_at: instant(r.created), updated_at: instant(r.created) });
        }
      }

      // The late chiller became an issue: I-001, opened from R-001 on the day it arrived late.
      const chiller = RISKS.find((r) => r.key === "chiller")!;
      const fromRisk = riskIds.get("chiller")!;
      const [issueId] = await trx("risks").insert({
        project_id: projectId,
        kind: "issue",
        number: 1,
        title: CHILLER_ISSUE.title,
        description: chiller.description,
        cause: chiller.cause,
        effect: chiller.effect,
        category: chiller.category,
        owner_id: lead,
        likelihood: 5,
        impact: 4,
        status: "open",
        audience: chiller.audience,
        impact_now: CHILLER_ISSUE.impactNow,
        action: CHILLER_ISSUE.action,
        due_date: date(CHILLER_ISSUE.due),
        from_risk_id: fromRisk,
        version: 1,
        created_at: instant(chiller.status!.at),
        updated_at: instant(chiller.status!.at),
      });
      riskIds.set("chiller-issue", Number(issueId));
      event(fromRisk, "issue", null, "I-001", chiller.status!.at, lead, chiller.status!.note);
      event(Number(issueId), "created", null, "I-001", chiller.status!.at, lead, "Opened from R-001");
      const issueMilestones = await byName("milestones", chiller.milestones ?? []);
      if (issueMilestones.length > 0) await trx("risk_milestones").insert(issueMilestones.map((m) => ({ risk_id: Number(issueId), milestone_id: m })));
      await trx("risk_events").insert(events);
      created.push(`risk register of ${RISKS.length} risks and 1 issue`);

      // Decisions needed, each linked to its milestones and risks.
      for (const [i, d] of DECISIONS.entries()) {
        const [id] = await trx("decisions").insert({
          project_id: projectId,
          number: i + 1,
          title: d.title,
          question: d.question,
          background: d.background,
          options: JSON.stringify(d.options),
          recommended_option: d.recommendedOption,
          recommendation: d.recommendation,
          decider: d.decider,
          needed_by: date(d.neededBy),
          status: d.outcome ? "decided" : "open",
          chosen_option: d.outcome?.chosenOption ?? null,
          outcome: d.outcome?.text ?? null,
          decided_by: d.outcome?.decidedBy ?? null,
          decided_on: d.outcome ? date(d.outcome.decidedOn) : null,
          outcome_recorded_by: d.outcome ? lead : null,
          audience: d.audience,
          version: d.outcome ? 2 : 1,
          created_at: instant(d.created),
          updated_at: instant(d.outcome?.at ?? d.created),
        });
        const decisionId = Number(id);
        const milestoneIds = await byName("milestones", d.milestones);
        if (milestoneIds.length > 0) await trx("decision_milestones").insert(milestoneIds.map((m) => ({ decision_id: decisionId, milestone_id: m })));
        const linkedRisks = d.risks.map((k) => riskIds.get(k)!);
        if (linkedRisks.length > 0) await trx("decision_risks").insert(linkedRisks.map((r) => ({ decision_id: decisionId, risk_id: r })));
        const decisionEvents: Array<{ field: string; from_value: string | null; to_value: string; at: Date; note: string | null }> = [
          { field: "created", from_value: null, to_value: `D-${pad(i + 1)}`, at: instant(d.created), note: null },
        ];
        if (d.outcome) {
          const at = instant(d.outcome.at);
          decisionEvents.push(
            { field: "status", from_value: "open", to_value: "decided", at, note: d.outcome.text },
            { field: "chosenOption", from_value: null, to_value: String(d.outcome.chosenOption), at, note: null },
            { field: "decidedBy", from_value: null, to_value: d.outcome.decidedBy, at, note: null },
            { field: "decidedOn", from_value: null, to_value: date(d.outcome.decidedOn), at, note: null },
          );
        }
        await trx("decision_events").insert(decisionEvents.map((e) => ({ ...e, project_id: projectId, decision_id: decisionId, by_user_id: lead })));
      }
      created.push(`${DECISIONS.length} decisions needed`);

      // Budget changes, and the contingency held.
      for (const [i, c] of CHANGES.entries()) {
        const [id] = await trx("budget_changes").insert({
          project_id: projectId,
          number: i + 1,
          description: c.description,
          detail: c.detail,
          amount: c.amount,
          status: c.status,
          approved_by: c.status === "approved" ? c.approvedBy : null,
          approved_on: c.status === "approved" && c.decidedOn !== null ? date(c.decidedOn) : null,
          draws_on_contingency: c.drawsOnContingency,
          audience: c.audience,
          version: c.status === "proposed" ? 1 : 2,
          created_at: instant(c.created),
          updated_at: instant(c.decidedOn === null ? c.created : [c.decidedOn, 16]),
        });
        const changeId = Number(id);
        const milestoneIds = await byName("milestones", c.milestones);
        if (milestoneIds.length > 0) await trx("budget_change_milestones").insert(milestoneIds.map((m) => ({ change_id: changeId, milestone_id: m })));
        const linkedRisks = c.risks.map((k) => riskIds.get(k)!);
        if (linkedRisks.length > 0) await trx("budget_change_risks").insert(linkedRisks.map((r) => ({ change_id: changeId, risk_id: r })));
        // As the budget service writes them: created and its first status; then the decision on it.
        const changeEvents: Array<Record<string, unknown>> = [
          { field: "created", from_value: null, to_value: `C-${pad(i + 1)}`, at: instant(c.created) },
          { field: "status", from_value: null, to_value: "proposed", at: instant(c.created) },
        ];
        if (c.status !== "proposed" && c.decidedOn !== null) {
          const at = instant([c.decidedOn, 16]);
          changeEvents.push({ field: "status", from_value: "proposed", to_value: c.status, at });
          if (c.status === "approved") changeEvents.push({ field: "approvedBy", from_value: null, to_value: c.approvedBy, at }, { field: "approvedOn", from_value: null, to_value: date(c.decidedOn), at });
        }
        await trx("budget_events").insert(changeEvents.map((e) => ({ note: null, ...e, project_id: projectId, change_id: changeId, by_user_id: lead })));
      }
      await trx("projects").where({ id: projectId }).update({ contingency_held: CONTINGENCY_HELD, projected_final_cost_method: "bac_over_cpi" });
      await trx("budget_events").insert({ project_id: projectId, change_id: null, field: "contingencyHeld", from_value: "0", to_value: String(CONTINGENCY_HELD), at: instant([-150, 9]), by_user_id: lead, note: null });
      created.push(`${CHANGES.length} budget changes and the contingency`);
    });
  }
  return { created };
}
