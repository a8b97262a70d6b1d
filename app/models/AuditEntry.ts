import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Proposal } from "./Proposal";
import type { User } from "./User";

export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>;
  declare actorId: ForeignKey<User["id"]> | null;
  declare action: string;
  declare entityType: string;
  declare entityId: number | null;
  declare proposalId: ForeignKey<Proposal["id"]> | null;
  declare details: Record<string, unknown> | null;
  declare createdAt: CreationOptional<Date>;
  declare actor?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    AuditEntry.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        action: { type: DataTypes.STRING(80), allowNull: false },
        entityType: { type: DataTypes.STRING(60), allowNull: false },
        entityId: DataTypes.INTEGER.UNSIGNED,
        details: DataTypes.JSON,
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "audit_log", updatedAt: false },
    );
  }
}
