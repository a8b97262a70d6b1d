// The semesters as the office set them: every call's code and first and last nights, in order.
// The epoch planner names an epoch's semester by these (lib/semesters semesterOf).
import type { Transaction } from "sequelize";
import type { SemesterSpan } from "~/lib/semesters";
import { Call } from "~/models/index.server";

export async function officeSemesters(transaction?: Transaction): Promise<SemesterSpan[]> {
  const calls = await Call.findAll({ attributes: ["semesterCode", "semesterStart", "semesterEnd"], order: [["semesterStart", "ASC"], ["id", "ASC"]], transaction });
  return calls.map(semesterSpan);
}

/** A call's semester as the planner reads it. */
export function semesterSpan(call: Pick<Call, "semesterCode" | "semesterStart" | "semesterEnd">): SemesterSpan {
  return { code: call.semesterCode, start: call.semesterStart, end: call.semesterEnd };
}
