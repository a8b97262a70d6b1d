import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { User } from "./User";

/** A reviewer on a call's panel; the timestamps make the list mail and the automatic reminder go out once. */
export class ReviewPanelMember extends Model<InferAttributes<ReviewPanelMember>, InferCreationAttributes<ReviewPanelMember>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare reviewerId: ForeignKey<User["id"]>;
  declare listMailedAt: CreationOptional<Date | null>;
  declare autoReminderSentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare reviewer?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    ReviewPanelMember.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        listMailedAt: DataTypes.DATE(3),
        autoReminderSentAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "review_panel_members" },
    );
  }
}
