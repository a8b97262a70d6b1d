// The epoch log: the observer role, and one row per executed (or lost) epoch of an accepted
// astrometry programme's observation, linked to the planned epoch it fulfilled when there was one.
import { DataTypes, type QueryInterface } from "sequelize";

const ref = (table: string, onDelete: "CASCADE" | "SET NULL" = "CASCADE", allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
  onUpdate: "CASCADE",
});

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.changeColumn("role_grants", "role", { type: DataTypes.ENUM("reviewer", "chair", "admin", "observer"), allowNull: false });
  await qi.createTable("executed_epochs", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    observationId: ref("observations"),
    plannedEpochId: ref("planned_epochs", "SET NULL", true),
    observedAt: { type: DataTypes.DATE(3), allowNull: false },
    telescopeId: ref("telescopes"),
    frames: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    fwhmArcsec: { type: DataTypes.DOUBLE, allowNull: true },
    snr: { type: DataTypes.DOUBLE, allowNull: true },
    /** given by the office, or derived from FWHM and SNR (precisionSource says which); null when lost */
    precisionMas: { type: DataTypes.DOUBLE, allowNull: true },
    precisionSource: { type: DataTypes.ENUM("given", "derived"), allowNull: true },
    lostCause: { type: DataTypes.ENUM("weather", "technical"), allowNull: true },
    note: { type: DataTypes.STRING(500), allowNull: true },
    source: { type: DataTypes.ENUM("form", "night-log", "api", "seed"), allowNull: false },
    recordedById: ref("users", "SET NULL", true),
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("executed_epochs", ["observationId", "observedAt"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("executed_epochs");
  await qi.sequelize.query("DELETE FROM role_grants WHERE role = 'observer'");
  await qi.changeColumn("role_grants", "role", { type: DataTypes.ENUM("reviewer", "chair", "admin"), allowNull: false });
}
