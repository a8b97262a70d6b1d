import { describe, expect, it } from "vitest";
import { findSelfReferences, foldText } from "./self-reference";

const team = [
  { name: "Ada Quill", institution: "Vesper Institute of Astronomy", email: "ada.quill@vesper.example" },
  { name: "Tomás Reyes-Ortiz", institution: "Harrow & Finch College", email: "t.reyes@hfc.example" },
];

describe("findSelfReferences", () => {
  it("finds names, institutions and phrases with their page numbers", () => {
    const pages = [
      "Science goals. The cluster is young.",
      "As shown in our previous work (Quill et al. 2025) at the Vesper Institute of\nAstronomy, the proper motions …",
      "Observations were reduced by Tomas Reyes-Ortiz at Harrow and Finch College.",
    ];
    const w = findSelfReferences({ pages, team });
    expect(w.map((x) => [x.page, x.kind, x.term])).toEqual([
      [2, "name", "Quill"],
      [2, "institution", "Vesper Institute of Astronomy"],
      [2, "phrase", "our previous work"],
      [3, "name", "Tomás Reyes-Ortiz"],
      [3, "institution", "Harrow & Finch College"],
    ]);
    expect(w[0].excerpt).toContain("Quill et al. 2025");
  });

  it("leaves a surname in another word or in lower case alone, and counts repeats", () => {
    const w = findSelfReferences({ pages: ["quill pens; Quillington; Quill 2024 and Quill 2025."], team });
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({ page: 1, term: "Quill", count: 2 });
  });

  it("finds nothing in a clean case", () => {
    expect(findSelfReferences({ pages: ["Earlier studies (Author A et al. 2020) found…"], team })).toEqual([]);
  });

  it("folds accents, hyphenated line breaks and white space", () => {
    expect(foldText("Tomás  Rey-\n es")).toBe("Tomas Reyes");
  });
});
