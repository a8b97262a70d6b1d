import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { decisionOutcomes, type DecisionOutcome, type LetterFacts } from "~/lib/decisions/vocabulary";
import type { Call } from "./Call";
import type { Charge } from "./Charge";
import type { DecisionBatch } from "./DecisionBatch";
import type { Proposal } from "./Proposal";
import type { User } from "./User";

/** A proposal's decision letter as sent: the filled template and the facts it showed. */
export class DecisionLetter extends Model<InferAttributes<DecisionLetter>, InferCreationAttributes<DecisionLetter>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare callId: ForeignKey<Call["id"]>;
  declare batchId: ForeignKey<DecisionBatch["id"]> | null;
  declare outcome: DecisionOutcome;
  declare subject: string;
  declare body: string;
  declare facts: LetterFacts;
  declare chargeId: ForeignKey<Charge["id"]> | null;
  declare sentAt: Date;
  declare sentById: ForeignKey<User["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare proposal?: NonAttribute<Proposal>;

  static initModel(sequelize: Sequelize) {
    DecisionLetter.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        outcome: { type: DataTypes.ENUM(...decisionOutcomes), allowNull: false },
        subject: { type: DataTypes.STRING(200), allowNull: false },
        body: { type: DataTypes.TEXT("medium"), allowNull: false },
        facts: { type: DataTypes.JSON, allowNull: false },
        sentAt: { type: DataTypes.DATE(3), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "decision_letters" },
    );
  }
}
