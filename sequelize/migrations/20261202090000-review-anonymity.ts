// Dual-anonymous review as a call option: whether reviewers see the team, and when the chair
// revealed the teams of such a call (after every grade was in).
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("calls", "teamVisibility", { type: DataTypes.ENUM("named", "dual_anonymous"), allowNull: false, defaultValue: "named" });
  await qi.addColumn("call_reviews", "teamsRevealedAt", { type: DataTypes.DATE(3), allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("call_reviews", "teamsRevealedAt");
  await qi.removeColumn("calls", "teamVisibility");
}
