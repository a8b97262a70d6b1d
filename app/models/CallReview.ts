import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Call } from "./Call";

/** A call's review: its deadline, reviewers per proposal, when the chair started it and committed the assignments. */
export class CallReview extends Model<InferAttributes<CallReview>, InferCreationAttributes<CallReview>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare reviewDeadlineAt: Date | null;
  declare perProposal: CreationOptional<number>;
  declare startedAt: CreationOptional<Date | null>;
  declare committedAt: CreationOptional<Date | null>;
  /** dual-anonymous calls: when the chair revealed the teams (audited as review.teams_revealed) */
  declare teamsRevealedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CallReview.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        reviewDeadlineAt: DataTypes.DATE(3),
        perProposal: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
        startedAt: DataTypes.DATE(3),
        committedAt: DataTypes.DATE(3),
        teamsRevealedAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "call_reviews" },
    );
  }
}
