import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";

export interface MailAttachment {
  filename: string;
  contentType: string;
  /** base64 */
  content: string;
}

export type MailKind = "proposal-receipt" | "decision-letter" | "charge-receipt";

export class OutgoingMail extends Model<InferAttributes<OutgoingMail>, InferCreationAttributes<OutgoingMail>> {
  declare id: CreationOptional<number>;
  declare toAddress: string;
  declare subject: string;
  declare textBody: string;
  declare htmlBody: string | null;
  declare attachments: MailAttachment[] | null;
  /** A renderer the worker runs when it sends (`app/lib/mail/renderers.server.ts`); null: send as stored. */
  declare kind: CreationOptional<MailKind | null>;
  declare payload: CreationOptional<Record<string, unknown> | null>;
  declare status: CreationOptional<"pending" | "sent" | "failed">;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare lastError: string | null;
  declare messageId: string | null;
  declare sentAt: Date | null;
  /** After this the message is useless (a sign-in code): given up instead of retried. */
  declare expiresAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    OutgoingMail.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        toAddress: { type: DataTypes.STRING(254), allowNull: false },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        textBody: { type: DataTypes.TEXT("medium"), allowNull: false },
        htmlBody: DataTypes.TEXT("medium"),
        attachments: DataTypes.JSON,
        kind: DataTypes.STRING(40),
        payload: DataTypes.JSON,
        status: { type: DataTypes.ENUM("pending", "sent", "failed"), allowNull: false, defaultValue: "pending" },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        nextAttemptAt: { type: DataTypes.DATE(3), allowNull: false },
        lastError: DataTypes.TEXT,
        messageId: DataTypes.STRING(300),
        sentAt: DataTypes.DATE(3),
        expiresAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "outgoing_mail" },
    );
  }
}
