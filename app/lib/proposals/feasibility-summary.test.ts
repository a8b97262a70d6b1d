// The sheet page's summary travels as columns: back to rows it must give the rows it was made
// from (the sheet itself is compared with the API's card in tests/integration/feasibility.test.ts).
import { describe, expect, it } from "vitest";
import { fromColumns, toColumns } from "./feasibility-summary";

describe("toColumns / fromColumns", () => {
  it("round-trips rows, nulls and all", () => {
    const rows = [
      { id: 1, name: "Field A", ra: 10.5, mag: null as number | null },
      { id: 2, name: "Field B", ra: 200.25, mag: 16.1 },
      { id: 3, name: "Field C", ra: 359.9, mag: null },
    ];
    const columns = toColumns(rows, ["id", "name", "ra", "mag"]);
    expect(columns).toEqual({ id: [1, 2, 3], name: ["Field A", "Field B", "Field C"], ra: [10.5, 200.25, 359.9], mag: [null, 16.1, null] });
    expect(fromColumns(columns)).toEqual(rows);
  });

  it("keeps only the keys asked for, and an empty list stays empty", () => {
    expect(fromColumns(toColumns([{ a: 1, b: 2 }], ["a"]))).toEqual([{ a: 1 }]);
    expect(fromColumns(toColumns([] as { a: number }[], ["a"]))).toEqual([]);
  });
});
