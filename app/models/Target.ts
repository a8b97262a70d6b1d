import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Proposal } from "./Proposal";

/** A target of a proposal: ICRS/J2000 position, optional proper motion (μα* includes cos δ). */
export class Target extends Model<InferAttributes<Target>, InferCreationAttributes<Target>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare name: string;
  declare raDeg: number;
  declare decDeg: number;
  declare pmRaMasPerYr: number | null;
  declare pmDecMasPerYr: number | null;
  declare magnitude: number | null;
  declare band: string | null;
  declare notes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Target.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        raDeg: { type: DataTypes.DOUBLE, allowNull: false },
        decDeg: { type: DataTypes.DOUBLE, allowNull: false },
        pmRaMasPerYr: DataTypes.DOUBLE,
        pmDecMasPerYr: DataTypes.DOUBLE,
        magnitude: DataTypes.DOUBLE,
        band: DataTypes.STRING(16),
        notes: DataTypes.TEXT,
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "targets" },
    );
  }
}
