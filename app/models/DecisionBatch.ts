import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { User } from "./User";

/** One "send all" (or one re-send) of a call's decision letters; its progress is its mails' states. */
export class DecisionBatch extends Model<InferAttributes<DecisionBatch>, InferCreationAttributes<DecisionBatch>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare kind: "all" | "resend";
  declare createdById: ForeignKey<User["id"]> | null;
  declare letters: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    DecisionBatch.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.ENUM("all", "resend"), allowNull: false },
        letters: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "decision_batches" },
    );
  }
}
