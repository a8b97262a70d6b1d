import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { User } from "./User";

/** The science categories a reviewer says they know (values of `scienceCategories`). */
export class ReviewerProfile extends Model<InferAttributes<ReviewerProfile>, InferCreationAttributes<ReviewerProfile>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User["id"]>;
  declare categories: string[];
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ReviewerProfile.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        categories: { type: DataTypes.JSON, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "reviewer_profiles" },
    );
  }
}
