import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { LostCause } from "~/lib/domain";
import type { Observation } from "./Observation";
import type { PlannedEpoch } from "./PlannedEpoch";
import type { Telescope } from "./Telescope";
import type { User } from "./User";

export type EpochRecordSource = "form" | "night-log" | "api" | "seed";

/** One executed or lost epoch of an observation (the epoch log). */
export class ExecutedEpoch extends Model<InferAttributes<ExecutedEpoch>, InferCreationAttributes<ExecutedEpoch>> {
  declare id: CreationOptional<number>;
  declare observationId: ForeignKey<Observation["id"]>;
  declare plannedEpochId: ForeignKey<PlannedEpoch["id"]> | null;
  declare observedAt: Date;
  declare telescopeId: ForeignKey<Telescope["id"]>;
  declare frames: number;
  declare fwhmArcsec: number | null;
  declare snr: number | null;
  declare precisionMas: number | null;
  declare precisionSource: "given" | "derived" | null;
  declare lostCause: LostCause | null;
  declare note: string | null;
  declare source: EpochRecordSource;
  declare recordedById: ForeignKey<User["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare observation?: NonAttribute<Observation>;

  static initModel(sequelize: Sequelize) {
    ExecutedEpoch.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        plannedEpochId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        telescopeId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        recordedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        observedAt: { type: DataTypes.DATE(3), allowNull: false },
        frames: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        fwhmArcsec: DataTypes.DOUBLE,
        snr: DataTypes.DOUBLE,
        precisionMas: DataTypes.DOUBLE,
        precisionSource: DataTypes.ENUM("given", "derived"),
        lostCause: DataTypes.ENUM("weather", "technical"),
        note: DataTypes.STRING(500),
        source: { type: DataTypes.ENUM("form", "night-log", "api", "seed"), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "executed_epochs" },
    );
  }
}
