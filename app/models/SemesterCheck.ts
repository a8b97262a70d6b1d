import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { User } from "./User";

export const semesterCheckStatuses = ["queued", "running", "done", "failed"] as const;
export type SemesterCheckStatus = (typeof semesterCheckStatuses)[number];

/** A simulated semester of a call's allocation, with its inputs' hash and its result. */
export class SemesterCheck extends Model<InferAttributes<SemesterCheck>, InferCreationAttributes<SemesterCheck>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare requestedById: ForeignKey<User["id"]> | null;
  declare status: CreationOptional<SemesterCheckStatus>;
  declare realisations: number;
  declare seed: number;
  declare inputHash: string;
  declare progress: CreationOptional<number>;
  declare result: unknown | null;
  declare error: string | null;
  declare startedAt: Date | null;
  declare finishedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SemesterCheck.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        status: { type: DataTypes.ENUM(...semesterCheckStatuses), allowNull: false, defaultValue: "queued" },
        realisations: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        seed: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        inputHash: { type: DataTypes.CHAR(64), allowNull: false },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        result: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.STRING(1000), allowNull: true },
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "semester_checks" },
    );
  }
}
