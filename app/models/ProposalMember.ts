import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Proposal } from "./Proposal";
import type { User } from "./User";

export type MemberRole = "pi" | "coi";

/** A PI or Co-I of a proposal; `userId` is null until the invited address signs in. */
export class ProposalMember extends Model<InferAttributes<ProposalMember>, InferCreationAttributes<ProposalMember>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare userId: ForeignKey<User["id"]> | null;
  declare email: string;
  declare role: MemberRole;
  declare acceptedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare user?: NonAttribute<User>;
  declare proposal?: NonAttribute<Proposal>;

  static initModel(sequelize: Sequelize) {
    ProposalMember.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        role: { type: DataTypes.ENUM("pi", "coi"), allowNull: false },
        acceptedAt: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "proposal_members" },
    );
  }
}
