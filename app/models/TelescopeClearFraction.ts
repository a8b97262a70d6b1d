import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Telescope } from "./Telescope";

/** Office setting: the fraction of nights expected clear at a telescope in a month (1–12). */
export class TelescopeClearFraction extends Model<InferAttributes<TelescopeClearFraction>, InferCreationAttributes<TelescopeClearFraction>> {
  declare id: CreationOptional<number>;
  declare telescopeId: ForeignKey<Telescope["id"]>;
  declare month: number;
  declare clearFraction: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TelescopeClearFraction.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        month: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
        clearFraction: { type: DataTypes.DOUBLE, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "telescope_clear_fractions" },
    );
  }
}
