import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { RoleGrant } from "./RoleGrant";

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string | null;
  declare institution: string | null;
  declare isMemberInstitution: CreationOptional<boolean>;
  declare lastSignInAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare roleGrants?: NonAttribute<RoleGrant[]>;

  static initModel(sequelize: Sequelize) {
    User.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
        name: DataTypes.STRING(200),
        institution: DataTypes.STRING(200),
        isMemberInstitution: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        lastSignInAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "users" },
    );
  }
}
