// A queued message can be rendered by the worker when it sends: `kind` names the renderer and
// `payload` holds what it needs (the receipt builds the proposal PDF then), so that the message
// can be queued in the same transaction as the change it reports.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("outgoing_mail", "kind", { type: DataTypes.STRING(40), allowNull: true });
  await qi.addColumn("outgoing_mail", "payload", { type: DataTypes.JSON, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Raw SQL: Sequelize 6's removeColumn trips over the MariaDB driver's result ("Cannot delete property 'meta'").
  await qi.sequelize.query("ALTER TABLE outgoing_mail DROP COLUMN payload, DROP COLUMN kind");
}
