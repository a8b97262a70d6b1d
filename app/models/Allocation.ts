import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { moonCategories, type MoonCategory } from "~/lib/domain";
import type { Call } from "./Call";
import type { Proposal } from "./Proposal";
import type { Telescope } from "./Telescope";

/** Hours allocated to a proposal on one telescope, moon category and semester. */
export class Allocation extends Model<InferAttributes<Allocation>, InferCreationAttributes<Allocation>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare telescopeId: ForeignKey<Telescope["id"]>;
  declare moonCategory: MoonCategory;
  /** The call's own semester, or a later one (then a commitment on that semester). */
  declare semesterCode: string;
  declare hours: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Allocation.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        moonCategory: { type: DataTypes.ENUM(...moonCategories), allowNull: false },
        semesterCode: { type: DataTypes.STRING(8), allowNull: false },
        hours: { type: DataTypes.DOUBLE, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "allocations" },
    );
  }
}
