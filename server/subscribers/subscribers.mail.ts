import type { Frequency, Topics } from "#shared/schemas/subscribers.ts";
import { escapeHtml } from "../mail/mail.layout.ts";
import { ACCENT } from "#shared/look.ts";

interface ProjectFooter {
  name: string;
  operatorName: string;
  postalAddress: string | null;
}

export interface RenderedMail {
  subject: string;
  html: string;
  text: string;
}

const FREQUENCY_WORDS: Record<Frequency, string> = {
  immediate: "as each update is published",
  weekly: "once a week, on Monday morning",
  monthly: "once a month, on the first working day",
};

function topicWords(t: Topics | null): string {
  if (!t) return "every part of the build";
  const parts = [...t.areas, ...t.systems.map((s) => `${s} plant`)];
  return parts.join(", ");
}

/**
 * One column with inline styles (mail clients drop style sheets), a text twin, and a
 * footer with the project, the operator's postal address and, for people on the list,
 * the preferences and unsubscribe links.
 */
function layout(p: {
  heading: string;
  paragraphs: string[];
  action: { label: string; url: string } | null;
  project: ProjectFooter;
  links: { preferencesUrl: string; unsubscribeUrl: string } | null;
  why: string;
}): { html: string; text: string } {
  // Who sends it and where they are, as every digest says it.
  const address = [p.project.operatorName, p.project.postalAddress].filter(Boolean).join(" · ");
  const linkHtml = p.links
    ? `<p style="margin:8px 0 0"><a href="${escapeHtml(p.links.preferencesUrl)}" style="color:#1d1f24">Change topics or frequency</a> · <a href="${escapeHtml(p.links.unsubscribeUrl)}" style="color:#1d1f24">Unsubscribe</a></p>`
    : "";
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(p.heading)}</title></head>
<body style="margin:0;padding:0;background:#f6f3ec;color:#1d1f24;font-family:Helvetica,Arial,sans-serif">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:#f6f3ec"><tr><td align="center" style="padding:24px 12px">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="max-width:560px;background:#fffdf8;border:1px solid #d9d3c4">
<tr><td style="padding:20px 24px;border-bottom:3px solid ${ACCENT};font-weight:bold;letter-spacing:.04em">${escapeHtml(p.project.name.toUpperCase())}</td></tr>
<tr><td style="padding:24px">
<h1 style="font-size:20px;margin:0 0 16px">${escapeHtml(p.heading)}</h1>
${p.paragraphs.map((t) => `<p style="font-size:15px;line-height:1.5;margin:0 0 14px">${escapeHtml(t)}</p>`).join("\n")}
${
  p.action
    ? `<p style="margin:24px 0"><a href="${escapeHtml(p.action.url)}" style="background:${ACCENT};color:#ffffff;padding:12px 18px;text-decoration:none;font-weight:bold;display:inline-block">${escapeHtml(p.action.label)}</a></p>
<p style="font-size:13px;line-height:1.5;color:#5a5e66;margin:0">If the button does not work, paste this address into your browser:<br><span style="word-break:break-all">${escapeHtml(p.action.url)}</span></p>`
    : ""
}
</td></tr>
<tr><td style="padding:16px 24px;font-size:12px;line-height:1.5;color:#5a5e66;border-top:1px solid #d9d3c4">
<p style="margin:0">${escapeHtml(p.why)}</p>
<p style="margin:8px 0 0">${escapeHtml(p.project.name)} · ${escapeHtml(address)}</p>
${linkHtml}
</td></tr>
</table></td></tr></table></body></html>`;
  const text = [
    p.heading,
    "",
    ...p.paragraphs.flatMap((t) => [t, ""]),
    ...(p.action ? [`${p.action.label}: ${p.action.url}`, ""] : []),
    "--",
    p.why,
    `${p.project.name} · ${address}`,
    ...(p.links ? [`Change topics or frequency: ${p.links.preferencesUrl}`, `Unsubscribe: ${p.links.unsubscribeUrl}`] : []),
    "",
  ].join("\n");
  return { html, text };
}

/** The double opt-in e-mail: one link to the confirmation page; nothing else is sent before it is used. */
export function confirmationMail(p: { project: ProjectFooter; name: string; confirmUrl: string; imported: boolean }): RenderedMail {
  const subject = `Confirm your subscription to ${p.project.name}`;
  const opening = p.imported
    ? `${p.project.operatorName} would like to send you progress e-mails about ${p.project.name}.`
    : `You asked to receive progress e-mails about ${p.project.name}, published by ${p.project.operatorName}.`;
  return {
    subject,
    ...layout({
      heading: "Confirm your subscription",
      paragraphs: [
        `Hello ${p.name},`,
        opening,
        "Open the link below and press the button on that page to confirm. The link works once and expires in 7 days.",
        "If you did not ask for this, ignore this message: nothing more will be sent, and the address is forgotten after 30 days.",
      ],
      action: { label: "Open the confirmation page", url: p.confirmUrl },
      project: p.project,
      links: null,
      why: "You receive this because this address was entered on the subscription form, or given to the operator, for this project.",
    }),
  };
}

/** After confirmation: what they will receive, and the links to change it or leave. */
export function welcomeMail(p: {
  project: ProjectFooter;
  name: string;
  frequency: Frequency;
  topics: Topics | null;
  links: { preferencesUrl: string; unsubscribeUrl: string };
}): RenderedMail {
  return {
    subject: `You are subscribed to ${p.project.name}`,
    ...layout({
      heading: "Your subscription is confirmed",
      paragraphs: [
        `Hello ${p.name},`,
        `You will receive progress e-mails about ${p.project.name} ${FREQUENCY_WORDS[p.frequency]}, covering ${topicWords(p.topics)}. An e-mail is sent only when there is something to report.`,
        "Every e-mail carries a link to change your topics or frequency, or to leave at once.",
      ],
      action: { label: "Review your preferences", url: p.links.preferencesUrl },
      project: p.project,
      links: p.links,
      why: "You receive this because you confirmed a subscription to this project's progress e-mails.",
    }),
  };
}

/** Subscribing an address that is already on the list: tell its owner, who alone reads it. */
export function alreadySubscribedMail(p: { project: ProjectFooter; name: string; links: { preferencesUrl: string; unsubscribeUrl: string } }): RenderedMail {
  return {
    subject: `You are already subscribed to ${p.project.name}`,
    ...layout({
      heading: "You are already subscribed",
      paragraphs: [
        `Hello ${p.name},`,
        `Someone, probably you, asked to subscribe this address to ${p.project.name}. It is already subscribed, so nothing has changed.`,
        "To change your topics or frequency, or to leave, use your preferences page.",
      ],
      action: { label: "Open your preferences", url: p.links.preferencesUrl },
      project: p.project,
      links: p.links,
      why: "You receive this because this address is subscribed to this project's progress e-mails.",
    }),
  };
}
