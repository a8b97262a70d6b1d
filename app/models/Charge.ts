import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { Proposal } from "./Proposal";
import type { User } from "./User";

export const chargeKinds = ["access_fee", "page_charge"] as const;
export type ChargeKind = (typeof chargeKinds)[number];
export const chargeStates = ["raised", "awaiting_payment", "paid", "waived"] as const;
export type ChargeState = (typeof chargeStates)[number];

/** A fee a programme owes (SPEC §1); amounts in the currency's minor unit. */
export class Charge extends Model<InferAttributes<Charge>, InferCreationAttributes<Charge>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare callId: ForeignKey<Call["id"]>;
  declare kind: ChargeKind;
  declare semesterCode: string;
  declare hours: number | null;
  declare pages: number | null;
  declare rateCents: number;
  declare amountCents: number;
  declare currency: string;
  declare state: CreationOptional<ChargeState>;
  declare checkoutSessionId: CreationOptional<string | null>;
  declare checkoutExpiresAt: CreationOptional<Date | null>;
  declare paidAt: CreationOptional<Date | null>;
  declare paymentEventId: CreationOptional<string | null>;
  declare waivedAt: CreationOptional<Date | null>;
  declare waivedById: CreationOptional<ForeignKey<User["id"]> | null>;
  declare waiveReason: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare proposal?: NonAttribute<Proposal>;
  declare call?: NonAttribute<Call>;
  declare waivedBy?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    Charge.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.ENUM(...chargeKinds), allowNull: false },
        semesterCode: { type: DataTypes.STRING(8), allowNull: false },
        hours: { type: DataTypes.DOUBLE, allowNull: true },
        pages: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        rateCents: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        amountCents: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        currency: { type: DataTypes.STRING(3), allowNull: false },
        state: { type: DataTypes.ENUM(...chargeStates), allowNull: false, defaultValue: "raised" },
        checkoutSessionId: { type: DataTypes.STRING(255), allowNull: true },
        checkoutExpiresAt: DataTypes.DATE(3),
        paidAt: DataTypes.DATE(3),
        paymentEventId: { type: DataTypes.STRING(255), allowNull: true },
        waivedAt: DataTypes.DATE(3),
        waiveReason: { type: DataTypes.STRING(500), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "charges" },
    );
  }
}
