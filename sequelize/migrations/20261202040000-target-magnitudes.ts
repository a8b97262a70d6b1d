import { DataTypes, type QueryInterface } from "sequelize";

// Magnitudes per band: targets.magnitudes (JSON, band → magnitude). Each target's single
// magnitude and band become its one entry; magnitude/band stay as a mirror of the first entry.
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("targets", "magnitudes", { type: DataTypes.JSON, allowNull: true });
  await qi.sequelize.query(
    "UPDATE targets SET magnitudes = IF(magnitude IS NOT NULL AND band IS NOT NULL AND band <> '', JSON_OBJECT(band, magnitude), JSON_OBJECT())",
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // raw: Sequelize's removeColumn trips over MariaDB's answer for a JSON column's check constraint
  await qi.sequelize.query("ALTER TABLE targets DROP COLUMN magnitudes");
}
