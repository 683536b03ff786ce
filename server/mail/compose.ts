/**
 * Every Tideline e-mail has the same plain shape, in an HTML part and a text part
 * built from the same pieces, so the two never say different things. Pure: no I/O.
 */
export interface Composed {
  subject: string;
  text: string;
  html: string;
}

export interface MailParts {
  subject: string;
  greeting?: string;
  /** Paragraphs of plain text; a paragraph that is an array becomes a bullet list. */
  body: Array<string | string[]>;
  action?: { label: string; url: string };
  /** Small print: why they got it, how to stop it. */
  footer?: string[];
}

const ESCAPES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };
export const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ESCAPES[c]);

function textPart(p: MailParts): string {
  const out: string[] = [];
  if (p.greeting) out.push(p.greeting);
  for (const b of p.body) out.push(Array.isArray(b) ? b.map((x) => `- ${x}`).join("\n") : b);
  if (p.action) out.push(`${p.action.label}:\n${p.action.url}`);
  if (p.footer?.length) out.push("--\n" + p.footer.join("\n"));
  return out.join("\n\n") + "\n";
}

const para = (s: string) => `<p style="margin:0 0 16px;line-height:1.5">${escapeHtml(s)}</p>`;
const list = (items: string[]) =>
  `<ul style="margin:0 0 16px;padding-left:20px;line-height:1.5">${items.map((x) => `<li>${escapeHtml(x)}</li>`).join("")}</ul>`;

function htmlPart(p: MailParts): string {
  const blocks = [
    p.greeting ? para(p.greeting) : "",
    ...p.body.map((b) => (Array.isArray(b) ? list(b) : para(b))),
    p.action
      ? `<p style="margin:24px 0"><a href="${escapeHtml(p.action.url)}" style="background:#e5b24f;color:#0b1117;padding:12px 20px;border-radius:6px;font-weight:bold;text-decoration:none;display:inline-block">${escapeHtml(p.action.label)}</a></p>` +
        `<p style="margin:0 0 16px;font-size:13px;color:#4a5f6c">Or open this address: <a href="${escapeHtml(p.action.url)}" style="color:#1f4775">${escapeHtml(p.action.url)}</a></p>`
      : "",
    p.footer?.length
      ? `<hr style="border:0;border-top:1px solid #b4c3cd;margin:24px 0 12px">${p.footer.map((f) => `<p style="margin:0 0 6px;font-size:12px;color:#4a5f6c">${escapeHtml(f)}</p>`).join("")}`
      : "",
  ];
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(p.subject)}</title></head><body style="margin:0;background:#edf2f5;color:#0b1117;font-family:Verdana,Arial,sans-serif;font-size:15px"><div style="max-width:560px;margin:0 auto;padding:24px;background:#ffffff"><p style="margin:0 0 20px;font-weight:bold;letter-spacing:1px;color:#22313d">TIDELINE</p>${blocks.join("")}</div></body></html>`;
}

export const compose = (p: MailParts): Composed => ({ subject: p.subject, text: textPart(p), html: htmlPart(p) });
