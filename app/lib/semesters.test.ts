import { describe, expect, it } from "vitest";
import { addMonths, defaultSemesterSpan, nextSemesterCode, semesterAfter, semesterOf, semesterSequence, shortSemester, upcomingSemesters } from "./semesters";

describe("semester codes", () => {
  it("A follows B of the year before, B follows A", () => {
    expect(nextSemesterCode("2027A")).toBe("2027B");
    expect(nextSemesterCode("2027B")).toBe("2028A");
    expect(nextSemesterCode("27A")).toBeNull();
    expect(upcomingSemesters("2027B")).toEqual(["2027B", "2028A", "2028B", "2029A"]);
    expect(upcomingSemesters("junk")).toEqual(["junk"]);
    expect(shortSemester("2027A")).toBe("27A");
  });
});

describe("semester dates", () => {
  it("adds months on the calendar; a day the month lacks becomes its last", () => {
    expect(addMonths("2027-08-01", 6)).toBe("2028-02-01");
    expect(addMonths("2027-08-31", 6)).toBe("2028-02-29"); // 2028 is a leap year
    expect(addMonths("2027-03-31", -1)).toBe("2027-02-28");
  });

  it("the default rule's dates: A 1 Feb – 31 Jul, B 1 Aug – 31 Jan", () => {
    expect(defaultSemesterSpan("2027A")).toEqual({ code: "2027A", start: "2027-02-01", end: "2027-07-31" });
    expect(defaultSemesterSpan("2027B")).toEqual({ code: "2027B", start: "2027-08-01", end: "2028-01-31" });
    expect(defaultSemesterSpan("27B")).toBeNull();
  });

  it("a semester nobody set follows on from the one before and lasts six months", () => {
    expect(semesterAfter({ code: "2027A", end: "2027-07-31" })).toEqual({ code: "2027B", start: "2027-08-01", end: "2028-01-31" });
    expect(semesterAfter({ code: "2027B", end: "2028-03-14" })).toEqual({ code: "2028A", start: "2028-03-15", end: "2028-09-14" });
  });

  it("a sequence takes the office's dates where a call has set them", () => {
    const first = { code: "2027A", start: "2027-03-01", end: "2027-08-31" };
    const known = [{ code: "2028A", start: "2028-04-01", end: "2028-09-30" }];
    expect(semesterSequence(first, 3, known)).toEqual([
      first,
      { code: "2027B", start: "2027-09-01", end: "2028-02-29" },
      known[0],
    ]);
  });
});

describe("semesterOf", () => {
  it("without calls: A = 1 Feb – 31 Jul, B = 1 Aug – 31 Jan (January belongs to the previous year's B)", () => {
    expect(semesterOf("2027-02-01")).toBe("2027A");
    expect(semesterOf("2027-07-31")).toBe("2027A");
    expect(semesterOf("2027-08-01")).toBe("2027B");
    expect(semesterOf("2028-01-31")).toBe("2027B");
  });

  it("with calls: the office's dates, and after them the semesters that follow on", () => {
    const known = [{ code: "2027B", start: "2027-10-01", end: "2028-03-31" }];
    expect(semesterOf("2028-03-31", known)).toBe("2027B"); // 2028A by the Feb/Aug rule
    expect(semesterOf("2027-10-01", known)).toBe("2027B");
    expect(semesterOf("2028-04-01", known)).toBe("2028A"); // 2028A runs 1 Apr – 30 Sep
    expect(semesterOf("2028-09-30", known)).toBe("2028A");
    expect(semesterOf("2028-10-01", known)).toBe("2028B");
    expect(semesterOf("2027-09-30", known)).toBe("2027B"); // before every call: the default rule
  });
});
