import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Observation } from "./Observation";

export type EpochStatus = "planned" | "observed" | "missed";

export class PlannedEpoch extends Model<InferAttributes<PlannedEpoch>, InferCreationAttributes<PlannedEpoch>> {
  declare id: CreationOptional<number>;
  declare observationId: ForeignKey<Observation["id"]>;
  /** YYYY-MM-DD, the local date on which the night begins */
  declare date: string;
  declare semesterCode: string;
  declare status: CreationOptional<EpochStatus>;
  declare observedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    PlannedEpoch.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        date: { type: DataTypes.DATEONLY, allowNull: false },
        semesterCode: { type: DataTypes.STRING(8), allowNull: false },
        status: { type: DataTypes.ENUM("planned", "observed", "missed"), allowNull: false, defaultValue: "planned" },
        observedAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "planned_epochs" },
    );
  }
}
