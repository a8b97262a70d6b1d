import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";

/** One request for a sign-in code, kept for rate limiting by address and by client IP. */
export class SignInRequest extends Model<InferAttributes<SignInRequest>, InferCreationAttributes<SignInRequest>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare ip: string;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SignInRequest.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        ip: { type: DataTypes.STRING(64), allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "sign_in_requests", updatedAt: false },
    );
  }
}

/** Server-side state of one issued code, so that codes are single-use and attempt-limited. */
export class SignInCode extends Model<InferAttributes<SignInCode>, InferCreationAttributes<SignInCode>> {
  declare id: CreationOptional<number>;
  declare tokenHash: string;
  declare email: string;
  declare failedAttempts: CreationOptional<number>;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SignInCode.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        failedAttempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        usedAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "sign_in_codes", updatedAt: false },
    );
  }
}
