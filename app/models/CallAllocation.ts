import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { User } from "./User";

/** A call's allocation: the chair's warning thresholds and the lock. */
export class CallAllocation extends Model<InferAttributes<CallAllocation>, InferCreationAttributes<CallAllocation>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  /** Assured hours above this share of offered raise a warning (0–1). */
  declare assuredShareLimit: CreationOptional<number>;
  /** All tiers above offered × (1 + this) raise a warning. */
  declare fillerMargin: CreationOptional<number>;
  declare lockedAt: Date | null;
  declare lockedById: ForeignKey<User["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CallAllocation.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        assuredShareLimit: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.8 },
        fillerMargin: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.3 },
        lockedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "call_allocations" },
    );
  }
}
