// Decision letters from the office's templates. Placeholders are a name in double square brackets,
// `[[code]]`; a template naming anything else is refused with that name. Pure: facts in, text out.
import { formatMoney } from "~/lib/payments/money";
import type { DecisionOutcome, LetterComment, LetterFacts } from "./vocabulary";

export const PLACEHOLDERS = {
  pi_name: "the PI's name",
  code: "the proposal code, e.g. 014/27A",
  title: "the proposal's title",
  semester: "the call's semester",
  call: "the call's title",
  outcome: "accepted, waitlisted or declined",
  hours: "the hours allocated, one line per telescope, moon category and semester",
  tier: "the allocation tier (assured, queue, filler)",
  charges: "the charges due (the access fee), or that nothing is due",
  comments: "every reviewer's comment to the PI, as Reviewer 1, 2, 3 …",
  date: "the date the letter is sent (UTC)",
} as const;
export type PlaceholderName = keyof typeof PLACEHOLDERS;
export const placeholderNames = Object.keys(PLACEHOLDERS) as PlaceholderName[];

const TOKEN = /\[\[([^[\]]*)\]\]/g;

/** The problems of a template text: unknown placeholders (named) and unclosed brackets. */
export function templateProblems(text: string): string[] {
  const problems: string[] = [];
  const unknown = new Set<string>();
  for (const m of text.matchAll(TOKEN)) {
    const name = m[1].trim();
    if (!(placeholderNames as string[]).includes(name)) unknown.add(name);
  }
  for (const name of unknown) problems.push(`Unknown placeholder [[${name}]]. Known: ${placeholderNames.map((n) => `[[${n}]]`).join(", ")}.`);
  const rest = text.replace(TOKEN, "");
  if (rest.includes("[[") || rest.includes("]]")) problems.push("A placeholder is not closed: write it as [[name]].");
  return problems;
}


const moonWords = { dark: "dark time", grey: "grey time", bright: "bright time" } as const;

export function hoursText(f: LetterFacts) {
  if (f.hours.length === 0) return "No hours are allocated.";
  return f.hours.map((h) => `- ${h.telescope}, ${moonWords[h.moonCategory]}, semester ${h.semesterCode}: ${h.hours.toFixed(1)} h`).join("\n");
}

export function chargesText(f: LetterFacts) {
  if (!f.charge) return "Nothing is due.";
  const rate = f.charge.hours !== null ? ` (${f.charge.hours.toFixed(1)} h at ${formatMoney(f.charge.rateCents, f.charge.currency)} per hour)` : "";
  return `An access fee of ${formatMoney(f.charge.amountCents, f.charge.currency)}${rate} is due. The PI pays it from the proposal's Charges page in Nightshare.`;
}

export function commentsText(comments: LetterComment[]) {
  if (comments.length === 0) return "The reviewers left no comments for the PI.";
  return comments.map((c) => `${c.label}:\n${c.text.trim()}`).join("\n\n");
}

export function placeholderValues(f: LetterFacts): Record<PlaceholderName, string> {
  return {
    pi_name: f.piName,
    code: f.code,
    title: f.title,
    semester: f.semesterCode,
    call: f.callTitle,
    outcome: f.outcome,
    hours: hoursText(f),
    tier: f.tier ?? "none",
    charges: chargesText(f),
    comments: commentsText(f.comments),
    date: f.date,
  };
}

/** The template with every placeholder filled (call only with a template without problems). */
export function fillTemplate(text: string, f: LetterFacts) {
  const values = placeholderValues(f);
  return text.replace(TOKEN, (whole, name: string) => values[name.trim() as PlaceholderName] ?? whole);
}

export const DEFAULT_TEMPLATES: Record<DecisionOutcome, { subject: string; body: string }> = {
  accepted: {
    subject: "Decision on [[code]]: time allocated in semester [[semester]]",
    body: [
      "Dear [[pi_name]],",
      "The time-allocation committee of the Kestrel Ridge Observatory has ranked the proposals to [[call]], and we are glad to tell you that [[code]], \"[[title]]\", has been allocated time in the [[tier]] tier:",
      "[[hours]]",
      "Charges: [[charges]]",
      "The reviewers' comments to you follow, without their names.",
      "[[comments]]",
      "The observing details and the epochs that are executed will appear in the proposal's workspace in Nightshare.",
      "With kind regards,\nThe observatory office, [[date]]",
    ].join("\n\n"),
  },
  waitlisted: {
    subject: "Decision on [[code]]: on the waiting list for semester [[semester]]",
    body: [
      "Dear [[pi_name]],",
      "The time-allocation committee has ranked the proposals to [[call]]. [[code]], \"[[title]]\", was ranked just below the time on offer and is on the waiting list: if allocated time is released during semester [[semester]], the office will offer it in ranking order and write to you first.",
      "The reviewers' comments to you follow, without their names.",
      "[[comments]]",
      "With kind regards,\nThe observatory office, [[date]]",
    ].join("\n\n"),
  },
  declined: {
    subject: "Decision on [[code]]: no time in semester [[semester]]",
    body: [
      "Dear [[pi_name]],",
      "The time-allocation committee has ranked the proposals to [[call]]. The requests were far more than the nights on offer, and we are sorry to tell you that [[code]], \"[[title]]\", was not allocated time.",
      "The reviewers' comments to you follow, without their names; we hope they help with a future proposal.",
      "[[comments]]",
      "With kind regards,\nThe observatory office, [[date]]",
    ].join("\n\n"),
  },
};

/** The letter's text: the template filled; the comments added at the end when the template leaves them out. */
export function composeLetter(template: { subject: string; body: string }, f: LetterFacts) {
  let body = fillTemplate(template.body, f);
  if (!/\[\[\s*comments\s*\]\]/.test(template.body) && f.comments.length > 0) body += `\n\nThe reviewers' comments to you:\n\n${commentsText(f.comments)}`;
  return { subject: fillTemplate(template.subject, f).replace(/\s+/g, " ").trim().slice(0, 200), body };
}
