// Plain-text first: every message reads well in any client; the HTML part only adds a button.
const escape = (text: string) =>
  text.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

function html(paragraphs: string[], button?: { label: string; href: string }) {
  const body = paragraphs.map((p) => `<p style="margin:0 0 14px">${escape(p)}</p>`).join("");
  const action = button
    ? `<p style="margin:20px 0"><a href="${escape(button.href)}" style="background:#1e3a5f;color:#fff;padding:10px 18px;border-radius:6px;text-decoration:none">${escape(button.label)}</a></p>`
    : "";
  return `<div style="font-family:'Source Sans 3',Arial,sans-serif;font-size:16px;color:#1c2430;max-width:560px">${body}${action}<p style="color:#6b7280;font-size:13px">Nightshare · Kestrel Ridge Observatory</p></div>`;
}

export function signInCodeMail({ code, link, minutes }: { code: string; link: string; minutes: number }) {
  const lines = [
    `Your Nightshare sign-in code is ${code}`,
    `Type it on the sign-in page, or open this link in the same browser: ${link}`,
    `The code works once and expires in ${minutes} minutes. If you did not ask for it, ignore this message.`,
  ];
  return {
    subject: `Nightshare sign-in code: ${code}`,
    text: lines.join("\n\n"),
    html: html(lines.slice(0, 1).concat(lines.slice(2)), { label: "Sign in to Nightshare", href: link }),
  };
}

/** Subjects fit the outgoing_mail.subject column (300) and a mail reader's line: one line, ≤ 200 characters. */
export const SUBJECT_MAX_CHARS = 200;

/** One line, at most SUBJECT_MAX_CHARS characters, cut on a character (never inside a surrogate pair) with an ellipsis. */
export function fitSubject(subject: string) {
  const line = subject.replace(/[\r\n\t\u0000-\u001f\u007f]+/g, " ").replace(/\s+/g, " ").trim();
  const chars = Array.from(line);
  return chars.length <= SUBJECT_MAX_CHARS ? line : `${chars.slice(0, SUBJECT_MAX_CHARS - 1).join("").trimEnd()}…`;
}

export function plainMail({ subject, paragraphs, button }: { subject: string; paragraphs: string[]; button?: { label: string; href: string } }) {
  const text = [...paragraphs, ...(button ? [`${button.label}: ${button.href}`] : [])].join("\n\n");
  return { subject: fitSubject(subject), text, html: html(paragraphs, button) };
}
