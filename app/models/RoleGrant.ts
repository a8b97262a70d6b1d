import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { User } from "./User";

import { grantableRoles, type GrantableRole } from "~/lib/domain";

export { grantableRoles, type GrantableRole };

export class RoleGrant extends Model<InferAttributes<RoleGrant>, InferCreationAttributes<RoleGrant>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<User["id"]>;
  declare role: GrantableRole;
  declare grantedById: ForeignKey<User["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    RoleGrant.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        role: { type: DataTypes.ENUM(...grantableRoles), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "role_grants" },
    );
  }
}
