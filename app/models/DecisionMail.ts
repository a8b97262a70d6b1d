import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { DecisionBatch } from "./DecisionBatch";
import type { DecisionLetter } from "./DecisionLetter";
import type { OutgoingMail } from "./OutgoingMail";

/** One outgoing mail (to the PI or a Co-I) that a batch queued for a letter. */
export class DecisionMail extends Model<InferAttributes<DecisionMail>, InferCreationAttributes<DecisionMail>> {
  declare id: CreationOptional<number>;
  declare batchId: ForeignKey<DecisionBatch["id"]>;
  declare letterId: ForeignKey<DecisionLetter["id"]>;
  declare outgoingMailId: ForeignKey<OutgoingMail["id"]>;
  declare toAddress: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    DecisionMail.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        toAddress: { type: DataTypes.STRING(254), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "decision_mails" },
    );
  }
}
