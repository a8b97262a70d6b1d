import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { decisionOutcomes, type DecisionOutcome } from "~/lib/decisions/vocabulary";
import type { User } from "./User";

/** The office's letter for one outcome, with placeholders (app/lib/decisions/template.ts). */
export class DecisionTemplate extends Model<InferAttributes<DecisionTemplate>, InferCreationAttributes<DecisionTemplate>> {
  declare id: CreationOptional<number>;
  declare outcome: DecisionOutcome;
  declare subject: string;
  declare body: string;
  declare updatedById: ForeignKey<User["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    DecisionTemplate.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        outcome: { type: DataTypes.ENUM(...decisionOutcomes), allowNull: false, unique: true },
        subject: { type: DataTypes.STRING(200), allowNull: false },
        body: { type: DataTypes.TEXT, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "decision_templates" },
    );
  }
}
