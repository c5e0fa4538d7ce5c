import type { EnquiryInput } from "#shared/schemas/enquiries.ts";
import { transactionalMail } from "../mail/mail.layout.ts";

const KIND_WORDS = { capacity: "Capacity", visit: "Site visit", general: "Question" } as const;

/** The note to marketing for one new enquiry: every field, and a link to work it in the site office. */
export function enquiryNotification(p: { projectName: string; enquiry: EnquiryInput; url: string }): { subject: string; html: string; text: string } {
  const e = p.enquiry;
  const who = e.organisation ? `${e.name} (${e.organisation})` : e.name;
  const lines: string[] = [`From: ${who} <${e.email}>${e.phone ? `, telephone ${e.phone}` : ""}`];
  if (e.kind === "capacity") lines.push(`Capacity: ${e.racks} racks at ${e.kwPerRack} kW per rack (${Math.round(e.racks * e.kwPerRack * 10) / 10} kW of IT load in all), needed by ${e.neededBy}`);
  if (e.kind === "visit") lines.push(`Site visit: ${e.partySize} ${e.partySize === 1 ? "person" : "people"}; preferred dates ${e.preferredDates.join(", ")}. The site rules were shown and accepted.`);
  if (e.message) lines.push(`Message: ${e.message}`);
  const summary = e.kind === "capacity" ? `${e.racks} racks at ${e.kwPerRack} kW` : e.kind === "visit" ? `${e.partySize} on ${e.preferredDates[0]}` : "a question";
  const body = transactionalMail({
    heading: `${KIND_WORDS[e.kind]} enquiry about ${p.projectName}`,
    paragraphs: lines,
    action: { label: "Open the enquiries list", url: p.url },
    footer: "Plumbline site office. You receive this because you work enquiries in the marketing role. Reply to this message to answer the enquirer.",
  });
  return { subject: `New enquiry (${KIND_WORDS[e.kind].toLowerCase()}): ${summary} from ${who}`, ...body };
}
