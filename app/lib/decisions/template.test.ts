import { describe, expect, it } from "vitest";
import { anonymisedComments } from "./anonymise";
import { composeLetter, DEFAULT_TEMPLATES, fillTemplate, templateProblems } from "./template";
import type { LetterFacts } from "./vocabulary";

const facts: LetterFacts = {
  proposalId: 7, code: "014/27A", title: "Proper motions in an invented field", semesterCode: "2027A", callTitle: "Call 2027A", piName: "Dr Invented",
  outcome: "accepted", hours: [{ telescope: "KRO 1.0 m", moonCategory: "grey", semesterCode: "2027A", hours: 6 }], tier: "filler",
  charge: { id: 1, amountCents: 75_000, currency: "EUR", hours: 6, rateCents: 12_500 }, comments: [{ label: "Reviewer 1", text: "Good." }], date: "2027-01-20",
};

describe("letter templates", () => {
  it("names an unknown placeholder and an unclosed one", () => {
    expect(templateProblems("Dear [[pi_name]], [[code]]")).toEqual([]);
    expect(templateProblems("by [[reviewer_name]] and [[ reviewer_name ]]")[0]).toMatch(/^Unknown placeholder \[\[reviewer_name\]\]\./);
    expect(templateProblems("Dear [[pi_name")).toEqual(["A placeholder is not closed: write it as [[name]]."]);
    expect(templateProblems("single [brackets] are text")).toEqual([]);
  });

  it("fills every placeholder; 6 h × EUR 125.00 = EUR 750.00 (by hand)", () => {
    expect(fillTemplate("[[pi_name]]|[[code]]|[[tier]]|[[hours]]", facts)).toBe("Dr Invented|014/27A|filler|- KRO 1.0 m, grey time, semester 2027A: 6.0 h");
    expect(fillTemplate("[[charges]]", facts)).toContain("An access fee of EUR 750.00 (6.0 h at EUR 125.00 per hour) is due.");
    expect(fillTemplate("[[charges]]", { ...facts, charge: null })).toBe("Nothing is due.");
  });

  it("leaves no placeholder in the default letters and adds the comments when a template leaves them out", () => {
    for (const t of Object.values(DEFAULT_TEMPLATES)) {
      expect(templateProblems(t.body)).toEqual([]);
      expect(composeLetter(t, facts).body).not.toMatch(/\[\[/);
    }
    expect(composeLetter({ subject: "S", body: "No comments here." }, facts).body).toBe("No comments here.\n\nThe reviewers' comments to you:\n\nReviewer 1:\nGood.");
  });
});

describe("anonymised comments", () => {
  const reviews = [
    { id: 11, commentToPi: "first written" },
    { id: 12, commentToPi: "  " },
    { id: 13, commentToPi: "second written" },
    { id: 14, commentToPi: "third written" },
  ];
  it("labels Reviewer 1, 2, 3 in an order fixed per proposal, skipping empty comments", () => {
    const a = anonymisedComments(7, reviews);
    expect(a.map((c) => c.label)).toEqual(["Reviewer 1", "Reviewer 2", "Reviewer 3"]);
    expect(a.map((c) => c.text).sort()).toEqual(["first written", "second written", "third written"]);
    expect(anonymisedComments(7, [...reviews].reverse())).toEqual(a); // not the order they come in
    // another proposal's seed gives another order for some set of ids (checked over a few proposals)
    const orders = new Set([1, 2, 3, 4, 5, 6, 8, 9].map((p) => anonymisedComments(p, reviews).map((c) => c.text).join("|")));
    expect(orders.size).toBeGreaterThan(1);
  });
});
