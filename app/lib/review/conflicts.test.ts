import { describe, expect, it } from "vitest";
import { detectConflicts, normaliseInstitution, pairKey } from "./conflicts";

describe("normaliseInstitution", () => {
  it("ignores case, accents, punctuation, 'the' and spacing", () => {
    expect(normaliseInstitution("  The Tessaly Institute of Astrophysics ")).toBe(normaliseInstitution("tessaly institute of astrophysics"));
    expect(normaliseInstitution("Brückwater Univ.")).toBe("bruckwater univ");
    expect(normaliseInstitution("Orrin College, Observatory")).toBe(normaliseInstitution("Orrin College Observatory"));
    expect(normaliseInstitution("Saltmere & Lowmoor")).toBe("saltmere and lowmoor");
    expect(normaliseInstitution(null)).toBe("");
  });
});

describe("detectConflicts", () => {
  const reviewer = { reviewerId: 1, email: "r@x.example", institution: "Vennholm University" };
  const team = (institution: string | null, userId: number | null = 99, email = "m@y.example") => [{ userId, email, institution }];
  it("team member by account and by invited address", () => {
    const c = detectConflicts({
      proposals: [
        { proposalId: 10, code: null, category: "a", team: team("Elsewhere", 1) },
        { proposalId: 11, code: null, category: "b", team: team("Elsewhere", null, "R@X.example") },
      ],
      reviewers: [reviewer],
    });
    expect(c.get(pairKey(10, 1))?.rule).toBe("team");
    expect(c.get(pairKey(11, 1))?.rule).toBe("team");
  });
  it("same institution after normalising, with the name in the reason", () => {
    const c = detectConflicts({ proposals: [{ proposalId: 10, code: null, category: "a", team: team("the vennholm  university") }], reviewers: [reviewer] });
    expect(c.get(pairKey(10, 1))).toMatchObject({ rule: "institution", reason: "same institution as a team member (the vennholm  university)" });
  });
  it("a reviewer without an institution has no institution conflicts", () => {
    const c = detectConflicts({ proposals: [{ proposalId: 10, code: null, category: "a", team: team(null) }], reviewers: [{ ...reviewer, institution: null }] });
    expect(c.size).toBe(0);
  });
  it("competitor: on another proposal of the same category (not of another category)", () => {
    const c = detectConflicts({
      proposals: [
        { proposalId: 10, code: "001/27A", category: "galaxies", team: team("Elsewhere", 1) },
        { proposalId: 11, code: "002/27A", category: "galaxies", team: team("Far away") },
        { proposalId: 12, code: "003/27A", category: "exoplanets", team: team("Far away") },
      ],
      reviewers: [reviewer],
    });
    expect(c.get(pairKey(11, 1))).toMatchObject({ rule: "competitor", reason: expect.stringContaining("001/27A") });
    expect(c.has(pairKey(12, 1))).toBe(false);
  });
  it("declared conflicts carry the reviewer's reason", () => {
    const c = detectConflicts({ proposals: [{ proposalId: 12, code: null, category: "a", team: team("Far away") }], reviewers: [reviewer], declared: [{ proposalId: 12, reviewerId: 1, reason: "former student" }] });
    expect(c.get(pairKey(12, 1))).toMatchObject({ rule: "declared", reason: "declared by the reviewer: former student" });
  });
});
