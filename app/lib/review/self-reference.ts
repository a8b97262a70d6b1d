// Dual-anonymous calls: where a science case gives its team away. Pure: the text of each page and
// the team in, warnings with page numbers out. They are warnings for the PI, never a refusal:
// a surname can be a common word, and citing one's own work in the third person is allowed.

export type SelfReferenceKind = "name" | "institution" | "email" | "phrase";
export type SelfReferenceWarning = { page: number; kind: SelfReferenceKind; term: string; excerpt: string; count: number };
export type TeamForCheck = { name: string | null; institution: string | null; email: string | null }[];

/** Phrases that speak of the team's own earlier work (our own list; matched without case). */
export const SELF_REFERENCE_PHRASES = [
  "our previous work",
  "our previous paper",
  "our previous observations",
  "our earlier work",
  "in our earlier",
  "our recent paper",
  "our own work",
  "our group",
  "our team",
  "our collaboration",
  "we have previously",
  "we previously",
  "as we showed",
  "as we have shown",
] as const;

/** Accents folded, a word hyphenated across a line joined, every run of white space one space. */
export function foldText(text: string): string {
  return text
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/(\p{L})-\s*\n\s*(\p{L})/gu, "$1$2")
    .replace(/\s+/g, " ")
    .trim();
}

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
const tokens = (s: string) => foldText(s).replace(/&/g, " and ").split(/[^\p{L}\p{N}]+/u).filter(Boolean);

/** A term as a pattern: its words in order, anything but letters and digits between them, whole words only. */
function pattern(term: string, caseSensitive: boolean): RegExp | null {
  const words = tokens(term).map((w) => (w.toLowerCase() === "and" ? "(?:and|&)" : escape(w)));
  if (words.length === 0) return null;
  return new RegExp(`(?<![\\p{L}\\p{N}])${words.join("[^\\p{L}\\p{N}]+")}(?![\\p{L}\\p{N}])`, caseSensitive ? "gu" : "giu");
}

function excerptAt(text: string, index: number, length: number) {
  const from = Math.max(0, index - 40);
  const to = Math.min(text.length, index + length + 40);
  return `${from > 0 ? "…" : ""}${text.slice(from, to).trim()}${to < text.length ? "…" : ""}`;
}

type Term = { kind: SelfReferenceKind; term: string; re: RegExp };

function termsOf(team: TeamForCheck): Term[] {
  const out: Term[] = [];
  const seen = new Set<string>();
  const add = (kind: SelfReferenceKind, term: string, caseSensitive = false) => {
    const key = `${kind}|${foldText(term).toLowerCase()}`;
    const re = pattern(term, caseSensitive);
    if (!re || seen.has(key)) return;
    seen.add(key);
    out.push({ kind, term: term.trim(), re });
  };
  for (const m of team) {
    if (m.name?.trim()) {
      add("name", m.name);
      const words = tokens(m.name);
      const surname = words[words.length - 1];
      // the surname alone (self-citations: "Quill et al."), with its capital, if it is not a tiny word
      if (words.length > 1 && surname && surname.length >= 3) add("name", surname, true);
    }
    if (m.institution?.trim()) add("institution", m.institution);
    if (m.email?.trim()) add("email", m.email);
  }
  for (const phrase of SELF_REFERENCE_PHRASES) add("phrase", phrase);
  return out;
}

/** Every term found on each page (pages numbered from 1), one warning per page and term with its first excerpt and the count. */
export function findSelfReferences({ pages, team }: { pages: string[]; team: TeamForCheck }): SelfReferenceWarning[] {
  const terms = termsOf(team);
  const warnings: SelfReferenceWarning[] = [];
  pages.forEach((raw, i) => {
    const text = foldText(raw);
    const covered: [number, number][] = [];
    for (const t of terms) {
      const hits = [...text.matchAll(t.re)].filter((m) => {
        const start = m.index ?? 0;
        // a surname inside a full name already found is the same finding
        return !covered.some(([a, b]) => start >= a && start < b);
      });
      if (!hits.length) continue;
      for (const h of hits) covered.push([h.index ?? 0, (h.index ?? 0) + h[0].length]);
      warnings.push({ page: i + 1, kind: t.kind, term: t.term, excerpt: excerptAt(text, hits[0].index ?? 0, hits[0][0].length), count: hits.length });
    }
  });
  return warnings.sort((a, b) => a.page - b.page);
}

export const selfReferenceKindLabels: Record<SelfReferenceKind, string> = {
  name: "a team member's name",
  institution: "a team institution",
  email: "a team e-mail address",
  phrase: "a phrase about the team's own work",
};
