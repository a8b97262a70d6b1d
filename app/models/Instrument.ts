import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Filter } from "./Filter";
import type { Telescope } from "./Telescope";

export class Instrument extends Model<InferAttributes<Instrument>, InferCreationAttributes<Instrument>> {
  declare id: CreationOptional<number>;
  declare telescopeId: ForeignKey<Telescope["id"]>;
  declare name: string;
  declare pixelScaleArcsec: number;
  declare readNoiseE: number;
  declare darkEPerPixelPerS: number;
  declare gainEPerAdu: number;
  declare fullWellE: number;
  declare readoutSeconds: number;
  declare acquisitionSeconds: number;
  declare astrometricFloorMas: number;
  /** End-to-end throughput of telescope optics, instrument, filter and detector QE (0–1). */
  declare throughput: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare filters?: NonAttribute<Filter[]>;
  declare telescope?: NonAttribute<Telescope>;

  static initModel(sequelize: Sequelize) {
    const number = () => ({ type: DataTypes.DOUBLE, allowNull: false });
    Instrument.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        pixelScaleArcsec: number(),
        readNoiseE: number(),
        darkEPerPixelPerS: number(),
        gainEPerAdu: number(),
        fullWellE: number(),
        readoutSeconds: number(),
        acquisitionSeconds: number(),
        astrometricFloorMas: number(),
        throughput: number(),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "instruments" },
    );
  }
}
