// plainIssue: one field name per message, in words (issue 8: "dec: Dec: must…").
import { describe, expect, it } from "vitest";
import { issueLine, plainIssue } from "./forms";

describe("plainIssue", () => {
  it("names the field once when the parser's label and the path were both put in front", () => {
    expect(plainIssue("dec: Dec: must be in the range −90 ≤ Dec ≤ +90 degrees", { field: "dec", name: "Dec" })).toBe("Dec must be in the range −90 ≤ Dec ≤ +90 degrees");
    expect(plainIssue("Dec: must be in the range −90 ≤ Dec ≤ +90 degrees", { field: "dec", name: "Dec" })).toBe("Dec must be in the range −90 ≤ Dec ≤ +90 degrees");
    expect(plainIssue("RA: hours must be 0–23", { field: "ra", name: "RA" })).toBe("RA hours must be 0–23");
    expect(plainIssue("Dec: not a declination (use ±dd:mm:ss.s)", { field: "target.dec", name: "Dec" })).toBe("Not a declination (use ±dd:mm:ss.s)");
  });

  it("turns API field ids into the form's words", () => {
    expect(plainIssue("maxAirmass must be at most 10", { field: "maxAirmass", name: "Max air mass" })).toBe("Max air mass must be at most 10");
    expect(plainIssue("give minAltitude or maxAirmass, not both", { field: "maxAirmass", name: "max air mass", names: { minAltitude: "min altitude" } })).toBe(
      "Give min altitude or max air mass, not both",
    );
  });

  it("says which field a bare message is about", () => {
    expect(plainIssue("must be a calendar date YYYY-MM-DD", { field: "from", name: "First night" })).toBe("First night must be a calendar date YYYY-MM-DD");
    expect(plainIssue("date is required (YYYY-MM-DD)", { field: "firstDate", name: "First date" })).toBe("First date is required (YYYY-MM-DD)");
  });

  it("leaves a message that already reads well alone", () => {
    expect(plainIssue("Give the band of the magnitude.", { field: "band", name: "Band" })).toBe("Give the band of the magnitude.");
  });
});

describe("issueLine", () => {
  it("puts the field in front only when the message does not name it already", () => {
    expect(issueLine("dec", "Dec: must be in the range −90 ≤ Dec ≤ +90 degrees")).toBe("Dec must be in the range −90 ≤ Dec ≤ +90 degrees");
    expect(issueLine("name", 'duplicate: "A" is already on line 2')).toBe('name: Duplicate: "A" is already on line 2');
  });

  it("keeps a CSV column's spelling when the message opens with it", () => {
    expect(issueLine("precision_mas", "precision_mas is required for an executed epoch", { asWritten: true })).toBe("precision_mas is required for an executed epoch");
    expect(issueLine("fwhm", "fwhm must be a number above 0", { asWritten: true })).toBe("fwhm must be a number above 0");
    expect(issueLine("fwhm", "fwhm must be a number above 0")).toBe("Fwhm must be a number above 0");
    expect(issueLine("dec", "Dec: must be in the range", { asWritten: true })).toBe("Dec must be in the range");
    expect(issueLine("observed_at", "duplicate: already on line 2", { asWritten: true })).toBe("observed_at: Duplicate: already on line 2");
  });
});
