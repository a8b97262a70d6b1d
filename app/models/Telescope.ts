import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Instrument } from "./Instrument";

export class Telescope extends Model<InferAttributes<Telescope>, InferCreationAttributes<Telescope>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare siteName: string;
  declare latitudeDeg: number;
  declare longitudeDeg: number;
  declare elevationM: number;
  declare timeZone: string;
  declare apertureM: number;
  /** Diameter of the central obstruction as a fraction of the aperture's diameter. */
  declare centralObstruction: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare instruments?: NonAttribute<Instrument[]>;

  static initModel(sequelize: Sequelize) {
    Telescope.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        siteName: { type: DataTypes.STRING(120), allowNull: false },
        latitudeDeg: { type: DataTypes.DOUBLE, allowNull: false },
        longitudeDeg: { type: DataTypes.DOUBLE, allowNull: false },
        elevationM: { type: DataTypes.DOUBLE, allowNull: false },
        timeZone: { type: DataTypes.STRING(64), allowNull: false },
        apertureM: { type: DataTypes.DOUBLE, allowNull: false },
        centralObstruction: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "telescopes" },
    );
  }
}
