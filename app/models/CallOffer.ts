import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { Telescope } from "./Telescope";

import { moonCategories, type MoonCategory } from "~/lib/domain";

/** Hours a call offers on one telescope in one moon category. */
export class CallOffer extends Model<InferAttributes<CallOffer>, InferCreationAttributes<CallOffer>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare telescopeId: ForeignKey<Telescope["id"]>;
  declare moonCategory: MoonCategory;
  declare hoursOffered: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare telescope?: NonAttribute<Telescope>;

  static initModel(sequelize: Sequelize) {
    CallOffer.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        moonCategory: { type: DataTypes.ENUM(...moonCategories), allowNull: false },
        hoursOffered: { type: DataTypes.DOUBLE, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "call_offers" },
    );
  }
}
