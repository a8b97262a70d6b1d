// The semesters as the office set them: every call's code and first and last nights, in order.
// The epoch planner names an epoch's semester by these (lib/semesters semesterOf).
import type { Transaction } from "sequelize";
import type { SemesterSpan } from "~/lib/semesters";
import { Call } from "~/models/index.server";

export async function officeSemesters(transaction?: Transaction): Promise<SemesterSpan[]> {
  const calls = await Call.findAll({ attributes: ["semesterCode", "semesterStart", "semesterEnd"], order: [["semesterStart", "ASC"], ["id", "ASC"]], transaction });
  return calls.map((c) => ({ code: c.semesterCode, start: c.semesterStart, end: c.semesterEnd }));
}
