import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Call } from "./Call";
import type { Observation } from "./Observation";
import type { ProposalMember } from "./ProposalMember";
import type { Target } from "./Target";
import type { User } from "./User";

import { proposalStatuses, type ProposalStatus } from "~/lib/domain";

export { proposalStatuses, type ProposalStatus };

export class Proposal extends Model<InferAttributes<Proposal>, InferCreationAttributes<Proposal>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  /** `014/27A` (serial within the call, short semester), given at first submission; unique per (callId, serial) */
  declare code: CreationOptional<string | null>;
  declare serial: CreationOptional<number | null>;
  declare title: string;
  declare abstract: string;
  declare scienceCategory: string | null;
  declare status: CreationOptional<ProposalStatus>;
  declare isMultiSemester: CreationOptional<boolean>;
  declare semestersRequested: string[];
  declare isTargetOfOpportunity: CreationOptional<boolean>;
  declare version: CreationOptional<number>;
  declare submittedAt: CreationOptional<Date | null>;
  /** when the decision letter was sent (app/lib/decisions/send.server.ts) */
  declare decisionSentAt: CreationOptional<Date | null>;
  declare createdById: ForeignKey<User["id"]>;
  /** distributed review: the team member (PI or a Co-I with an account) who reviews for the team */
  declare designatedReviewerId: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare call?: NonAttribute<Call>;
  declare members?: NonAttribute<ProposalMember[]>;
  declare targets?: NonAttribute<Target[]>;
  declare observations?: NonAttribute<Observation[]>;
  declare createdBy?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    Proposal.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        code: { type: DataTypes.STRING(20), allowNull: true },
        serial: { type: DataTypes.INTEGER, allowNull: true },
        title: { type: DataTypes.STRING(300), allowNull: false },
        abstract: { type: DataTypes.TEXT, allowNull: false },
        scienceCategory: DataTypes.STRING(60),
        status: { type: DataTypes.ENUM(...proposalStatuses), allowNull: false, defaultValue: "draft" },
        isMultiSemester: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        semestersRequested: { type: DataTypes.JSON, allowNull: false },
        isTargetOfOpportunity: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        submittedAt: DataTypes.DATE(3),
        decisionSentAt: DataTypes.DATE(3),
        designatedReviewerId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      // Optimistic locking: every save checks and bumps `version`.
      { sequelize, tableName: "proposals", version: true },
    );
  }
}
