// Whether the chair set a proposal's hours, tier or waitlist by hand (the allocation page or the
// API) rather than fill by rank: a later fill keeps such a proposal as the chair left it.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("board_entries", "allocatedByHand", { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Raw SQL: Sequelize 6's removeColumn trips over the MariaDB driver's result ("Cannot delete property 'meta'").
  await qi.sequelize.query("ALTER TABLE board_entries DROP COLUMN allocatedByHand");
}
