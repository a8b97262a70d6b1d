// Dual-anonymous review as a call option: whether reviewers see the team, and when the chair
// revealed the teams of such a call (after every grade was in).
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("calls", "teamVisibility", { type: DataTypes.ENUM("named", "dual_anonymous"), allowNull: false, defaultValue: "named" });
  await qi.addColumn("call_reviews", "teamsRevealedAt", { type: DataTypes.DATE(3), allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Raw SQL: Sequelize 6's removeColumn trips over the MariaDB driver's result ("Cannot delete property 'meta'").
  await qi.sequelize.query("ALTER TABLE call_reviews DROP COLUMN teamsRevealedAt");
  await qi.sequelize.query("ALTER TABLE calls DROP COLUMN teamVisibility");
}
