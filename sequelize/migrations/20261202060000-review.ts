// The review half of the cycle: a call's review (deadline, when it started and was committed), its
// panel, the categories each reviewer knows, and the assignments that carry the grades.
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
const merit = { type: DataTypes.DECIMAL(3, 1), allowNull: true };

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("call_reviews", {
    id,
    callId: { ...ref("calls"), unique: true },
    reviewDeadlineAt: { type: DataTypes.DATE(3), allowNull: true },
    perProposal: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
    startedAt: { type: DataTypes.DATE(3), allowNull: true },
    committedAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.createTable("review_panel_members", {
    id,
    callId: ref("calls"),
    reviewerId: ref("users"),
    listMailedAt: { type: DataTypes.DATE(3), allowNull: true },
    autoReminderSentAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("review_panel_members", ["callId", "reviewerId"], { unique: true });
  await qi.createTable("reviewer_profiles", {
    id,
    userId: { ...ref("users"), unique: true },
    categories: { type: DataTypes.JSON, allowNull: false },
    ...timestamps,
  });
  await qi.createTable("review_assignments", {
    id,
    callId: ref("calls"),
    proposalId: ref("proposals"),
    reviewerId: ref("users"),
    status: { type: DataTypes.ENUM("assigned", "draft", "submitted", "conflict"), allowNull: false, defaultValue: "assigned" },
    committedAt: { type: DataTypes.DATE(3), allowNull: true },
    science: merit,
    feasibility: merit,
    legacy: merit,
    overall: merit,
    commentToPi: { type: DataTypes.TEXT, allowNull: true },
    commentToCommittee: { type: DataTypes.TEXT, allowNull: true },
    conflictReason: { type: DataTypes.STRING(500), allowNull: true },
    submittedAt: { type: DataTypes.DATE(3), allowNull: true },
    reopenedUntil: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("review_assignments", ["proposalId", "reviewerId"], { unique: true });
  await qi.addIndex("review_assignments", ["callId", "reviewerId"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const table of ["review_assignments", "reviewer_profiles", "review_panel_members", "call_reviews"]) await qi.dropTable(table);
}
