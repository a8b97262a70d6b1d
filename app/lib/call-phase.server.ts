// The call phases of call-phase.ts as `where` clauses on the calls table.
import { Op, type WhereOptions } from "sequelize";
import type { Call } from "~/models/index.server";

/** Open now: opened, deadline not reached. */
export const openCallsWhere = (now: Date): WhereOptions<Call> => ({ opensAt: { [Op.lte]: now }, deadlineAt: { [Op.gt]: now } });

/** Open or announced: the deadline not reached. */
export const currentCallsWhere = (now: Date): WhereOptions<Call> => ({ deadlineAt: { [Op.gt]: now } });

/** Closed: the deadline reached. */
export const closedCallsWhere = (now: Date): WhereOptions<Call> => ({ deadlineAt: { [Op.lte]: now } });
