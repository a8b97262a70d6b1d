import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { User } from "./User";

/** A signed-in browser. The cookie carries a random token; only its sha256 is stored here. */
export class UserSession extends Model<InferAttributes<UserSession>, InferCreationAttributes<UserSession>> {
  declare id: CreationOptional<number>;
  declare tokenHash: string;
  declare userId: ForeignKey<User["id"]>;
  declare createdAt: CreationOptional<Date>;
  declare lastSeenAt: Date;
  /** Absolute end, whatever the activity. */
  declare expiresAt: Date;
  declare user?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    UserSession.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        createdAt: DataTypes.DATE(3),
        lastSeenAt: { type: DataTypes.DATE(3), allowNull: false },
        expiresAt: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, tableName: "sessions", updatedAt: false },
    );
  }
}
