// Conflict-of-interest rules of the review (pure: plain data in, conflicts with reasons out).
// A reviewer may not review a proposal when any of these holds:
//   team        – the reviewer is the PI or a Co-I of the proposal (by account or by invited address);
//   institution – the reviewer's institution equals a team member's, after normalising the names;
//   competitor  – the reviewer is PI or Co-I of another proposal of the same call and category;
//   declared    – the reviewer declared a conflict for this proposal.
// In a distributed review every reviewer is on a team of the call, so "competitor" there means
// (when the call keeps competitors apart) a shared telescope × moon category among the hours the
// two proposals request (`requests`), and nothing at all when it does not.
import { sameEmail } from "~/lib/email";

export type ConflictRule = "team" | "institution" | "competitor" | "declared";

export type TeamMemberFacts = { userId: number | null; email: string; institution: string | null; name?: string | null };
export type ProposalFacts = {
  proposalId: number;
  code: string | null;
  category: string | null;
  team: TeamMemberFacts[];
  /** "telescopeId|moonCategory" cells of the call's semester in which the proposal requests hours */
  requests?: readonly string[];
};
/** What makes two proposals of one call competitors: the science category (panel), a requested cell (distributed), or nothing. */
export type Competition = "category" | "requests" | "none";
export type ReviewerFacts = { reviewerId: number; email: string; institution: string | null };
export type DeclaredConflict = { proposalId: number; reviewerId: number; reason: string };
export type Conflict = { proposalId: number; reviewerId: number; rule: ConflictRule; reason: string };

/** Institution names compared without case, accents, punctuation, "the" or extra spaces. */
export function normaliseInstitution(name: string | null | undefined): string {
  if (!name) return "";
  return name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/&/g, " and ")
    .replace(/[^a-z0-9]+/g, " ")
    .replace(/\b(the)\b/g, " ")
    .replace(/\s+/g, " ")
    .trim();
}

const isMember = (m: TeamMemberFacts, r: ReviewerFacts) => m.userId === r.reviewerId || sameEmail(m.email, r.email);

/** The first reason for each conflicted pair (in the order of the rules above), keyed `proposalId:reviewerId`. */
export function detectConflicts({
  proposals,
  reviewers,
  declared = [],
  competition = "category",
}: {
  proposals: ProposalFacts[];
  reviewers: ReviewerFacts[];
  declared?: DeclaredConflict[];
  competition?: Competition;
}): Map<string, Conflict> {
  const out = new Map<string, Conflict>();
  const add = (c: Conflict) => {
    const key = pairKey(c.proposalId, c.reviewerId);
    if (!out.has(key)) out.set(key, c);
  };
  for (const r of reviewers) {
    const own = normaliseInstitution(r.institution);
    // proposals this reviewer is on the team of: their categories make the reviewer a competitor
    const onTeam = proposals.filter((p) => p.team.some((m) => isMember(m, r)));
    for (const p of proposals) {
      const mine = p.team.find((m) => isMember(m, r));
      if (mine) {
        add({ proposalId: p.proposalId, reviewerId: r.reviewerId, rule: "team", reason: "is on the proposal's team" });
        continue;
      }
      const colleague = own ? p.team.find((m) => normaliseInstitution(m.institution) === own) : undefined;
      if (colleague) {
        add({ proposalId: p.proposalId, reviewerId: r.reviewerId, rule: "institution", reason: `same institution as a team member (${colleague.institution})` });
        continue;
      }
      if (competition === "category") {
        const rival = p.category ? onTeam.find((o) => o.proposalId !== p.proposalId && o.category === p.category) : undefined;
        if (rival) {
          add({ proposalId: p.proposalId, reviewerId: r.reviewerId, rule: "competitor", reason: `on the team of ${rival.code ?? `proposal ${rival.proposalId}`}, a competing proposal in the same call and category` });
        }
      } else if (competition === "requests") {
        const cells = new Set(p.requests ?? []);
        const rival = onTeam.find((o) => o.proposalId !== p.proposalId && (o.requests ?? []).some((c) => cells.has(c)));
        if (rival) {
          add({ proposalId: p.proposalId, reviewerId: r.reviewerId, rule: "competitor", reason: `on the team of ${rival.code ?? `proposal ${rival.proposalId}`}, which asks for the same telescope and moon category` });
        }
      }
    }
  }
  for (const d of declared) add({ proposalId: d.proposalId, reviewerId: d.reviewerId, rule: "declared", reason: `declared by the reviewer: ${d.reason}` });
  return out;
}

export const pairKey = (proposalId: number, reviewerId: number) => `${proposalId}:${reviewerId}`;
