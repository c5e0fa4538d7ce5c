import { ACCENT } from "#shared/look.ts";

/** Escapes text for HTML e-mail bodies. */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

/**
 * The plain layout of Plumbline's transactional e-mails (invitations, resets): one
 * column, inline styles only (mail clients drop style sheets), and a text twin.
 */
export function transactionalMail(p: {
  heading: string;
  paragraphs: string[];
  action: { label: string; url: string };
  footer: string;
}): { html: string; text: string } {
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(p.heading)}</title></head>
<body style="margin:0;padding:0;background:#f6f3ec;color:#1d1f24;font-family:Helvetica,Arial,sans-serif">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:#f6f3ec"><tr><td align="center" style="padding:24px 12px">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="max-width:560px;background:#fffdf8;border:1px solid #d9d3c4">
<tr><td style="padding:20px 24px;border-bottom:3px solid ${ACCENT};font-weight:bold;letter-spacing:.04em">PLUMBLINE</td></tr>
<tr><td style="padding:24px">
<h1 style="font-size:20px;margin:0 0 16px">${escapeHtml(p.heading)}</h1>
${p.paragraphs.map((t) => `<p style="font-size:15px;line-height:1.5;margin:0 0 14px">${escapeHtml(t)}</p>`).join("\n")}
<p style="margin:24px 0"><a href="${escapeHtml(p.action.url)}" style="background:${ACCENT};color:#ffffff;padding:12px 18px;text-decoration:none;font-weight:bold;display:inline-block">${escapeHtml(p.action.label)}</a></p>
<p style="font-size:13px;line-height:1.5;color:#5a5e66;margin:0">If the button does not work, paste this address into your browser:<br><span style="word-break:break-all">${escapeHtml(p.action.url)}</span></p>
</td></tr>
<tr><td style="padding:16px 24px;font-size:12px;color:#5a5e66;border-top:1px solid #d9d3c4">${escapeHtml(p.footer)}</td></tr>
</table></td></tr></table></body></html>`;
  const text = [p.heading, "", ...p.paragraphs.flatMap((t) => [t, ""]), `${p.action.label}: ${p.action.url}`, "", "--", p.footer, ""].join("\n");
  return { html, text };
}
