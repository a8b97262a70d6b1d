import { DataTypes, type QueryInterface } from "sequelize";

// A message that is useless after a moment (a sign-in code) is given up instead of retried past it.
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("outgoing_mail", "expiresAt", { type: DataTypes.DATE(3), allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Raw SQL: Sequelize's removeColumn fails on the mariadb dialect.
  await qi.sequelize.query("ALTER TABLE outgoing_mail DROP COLUMN expiresAt");
}
