// The allocation half of the cycle: each telescope's expected clear fraction per month, the chair's
// board state per call (settings, lock), the chair's position and tier per proposal, the hours
// allocated per telescope × moon category × semester, and the semester checks with their results.
import { DataTypes, type QueryInterface } from "sequelize";

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const ref = (table: string, onDelete: "CASCADE" | "SET NULL" = "CASCADE", allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
  onUpdate: "CASCADE",
});
const timestamps = {
  createdAt: { type: DataTypes.DATE(3), allowNull: false },
  updatedAt: { type: DataTypes.DATE(3), allowNull: false },
};

export async function up({ context: qi }: { context: QueryInterface }) {
  // An office setting: the fraction of nights expected clear at a telescope, month by month (1–12).
  await qi.createTable("telescope_clear_fractions", {
    id,
    telescopeId: ref("telescopes"),
    month: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    clearFraction: { type: DataTypes.DOUBLE, allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("telescope_clear_fractions", ["telescopeId", "month"], { unique: true });

  // One row per call once the chair opens its board: warning thresholds and the lock.
  await qi.createTable("call_allocations", {
    id,
    callId: { ...ref("calls"), unique: true },
    assuredShareLimit: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.8 },
    fillerMargin: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.3 },
    lockedAt: { type: DataTypes.DATE(3), allowNull: true },
    lockedById: ref("users", "SET NULL", true),
    ...timestamps,
  });

  // The chair's decisions per proposal: a position on the board (null = the computed rank), the
  // reason for it, the tier, and whether the chair waitlists it instead of declining it.
  await qi.createTable("board_entries", {
    id,
    callId: ref("calls"),
    proposalId: { ...ref("proposals"), unique: true },
    chairRank: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    chairRankReason: { type: DataTypes.STRING(500), allowNull: true },
    tier: { type: DataTypes.ENUM("assured", "queue", "filler"), allowNull: true },
    waitlisted: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...timestamps,
  });
  await qi.addIndex("board_entries", ["callId"]);

  // Hours allocated to a proposal; a semester after the call's own is a commitment on that semester.
  await qi.createTable("allocations", {
    id,
    callId: ref("calls"),
    proposalId: ref("proposals"),
    telescopeId: ref("telescopes"),
    moonCategory: { type: DataTypes.ENUM("dark", "grey", "bright"), allowNull: false },
    semesterCode: { type: DataTypes.STRING(8), allowNull: false },
    hours: { type: DataTypes.DOUBLE, allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("allocations", ["proposalId", "telescopeId", "moonCategory", "semesterCode"], { unique: true, name: "allocations_cell" });
  await qi.addIndex("allocations", ["semesterCode"]);
  await qi.addIndex("allocations", ["callId"]);

  // A simulated semester: run in a worker thread; the inputs' hash tells the board when it is stale.
  await qi.createTable("semester_checks", {
    id,
    callId: ref("calls"),
    requestedById: ref("users", "SET NULL", true),
    status: { type: DataTypes.ENUM("queued", "running", "done", "failed"), allowNull: false, defaultValue: "queued" },
    realisations: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    seed: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    inputHash: { type: DataTypes.CHAR(64), allowNull: false },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    result: { type: DataTypes.JSON, allowNull: true },
    error: { type: DataTypes.STRING(1000), allowNull: true },
    startedAt: { type: DataTypes.DATE(3), allowNull: true },
    finishedAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("semester_checks", ["callId", "createdAt"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const table of ["semester_checks", "allocations", "board_entries", "call_allocations", "telescope_clear_fractions"]) await qi.dropTable(table);
}
