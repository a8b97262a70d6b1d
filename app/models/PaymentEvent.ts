import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";

/** A webhook event from the payment service, recorded once per event id. */
export class PaymentEvent extends Model<InferAttributes<PaymentEvent>, InferCreationAttributes<PaymentEvent>> {
  declare id: CreationOptional<number>;
  declare eventId: string;
  declare type: string;
  declare objectId: string | null;
  declare payload: Record<string, unknown>;
  declare receivedAt: Date;

  static initModel(sequelize: Sequelize) {
    PaymentEvent.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        eventId: { type: DataTypes.STRING(100), allowNull: false, unique: true },
        type: { type: DataTypes.STRING(100), allowNull: false },
        objectId: DataTypes.STRING(100),
        payload: { type: DataTypes.JSON, allowNull: false },
        receivedAt: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, tableName: "payment_events", timestamps: false },
    );
  }
}
