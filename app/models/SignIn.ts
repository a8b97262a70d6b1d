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

/**
 * Server-side state of one issued code: the address it was issued for (the only address that can
 * sign in with it), single use, and the count of evaluated attempts (reserved before each check).
 */
export class SignInCode extends Model<InferAttributes<SignInCode>, InferCreationAttributes<SignInCode>> {
  declare id: CreationOptional<number>;
  declare tokenHash: string;
  declare email: string;
  declare attempts: CreationOptional<number>;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SignInCode.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        usedAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "sign_in_codes", updatedAt: false },
    );
  }
}

/** One row per rate-limited key (`email:…`, `ip:…`), locked FOR UPDATE while a request is counted. */
export class RateLimitKey extends Model<InferAttributes<RateLimitKey>, InferCreationAttributes<RateLimitKey>> {
  declare lockKey: string;

  static initModel(sequelize: Sequelize) {
    RateLimitKey.init(
      { lockKey: { type: DataTypes.STRING(320), allowNull: false, primaryKey: true } },
      { sequelize, tableName: "rate_limit_keys", timestamps: false },
    );
  }
}
