import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Instrument } from "./Instrument";

export class Filter extends Model<InferAttributes<Filter>, InferCreationAttributes<Filter>> {
  declare id: CreationOptional<number>;
  declare instrumentId: ForeignKey<Instrument["id"]>;
  declare band: string;
  /** Photons s⁻¹ cm⁻² from a magnitude-0 source over the band, above the atmosphere. */
  declare zeroPointPhotons: number;
  declare extinctionMagPerAirmass: number;
  declare skyDarkMag: number;
  declare skyGreyMag: number;
  declare skyBrightMag: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    const number = () => ({ type: DataTypes.DOUBLE, allowNull: false });
    Filter.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        band: { type: DataTypes.STRING(16), allowNull: false },
        zeroPointPhotons: number(),
        extinctionMagPerAirmass: number(),
        skyDarkMag: number(),
        skyGreyMag: number(),
        skyBrightMag: number(),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "filters" },
    );
  }
}
