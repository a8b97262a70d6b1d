import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { ReviewAssignment } from "./ReviewAssignment";
import type { User } from "./User";

/** A team member's rating (1–5) of how helpful one review's comment to the PI was; one per rater and review. */
export class ReviewHelpfulness extends Model<InferAttributes<ReviewHelpfulness>, InferCreationAttributes<ReviewHelpfulness>> {
  declare id: CreationOptional<number>;
  declare assignmentId: ForeignKey<ReviewAssignment["id"]>;
  declare raterId: ForeignKey<User["id"]>;
  declare rating: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ReviewHelpfulness.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        rating: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "review_helpfulness" },
    );
  }
}
