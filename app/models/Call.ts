import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { ReviewMode, UnreviewedPolicy } from "~/lib/review/vocabulary";
import { teamVisibilities, type TeamVisibility } from "~/lib/domain";
import type { CallOffer } from "./CallOffer";

export class Call extends Model<InferAttributes<Call>, InferCreationAttributes<Call>> {
  declare id: CreationOptional<number>;
  /** e.g. 2027A */
  declare semesterCode: string;
  declare title: string;
  declare opensAt: Date;
  declare deadlineAt: Date;
  /** YYYY-MM-DD, inclusive */
  declare semesterStart: string;
  /** YYYY-MM-DD, inclusive */
  declare semesterEnd: string;
  declare pageLimit: number;
  declare currency: CreationOptional<string>;
  declare accessFeePerHourCents: CreationOptional<number>;
  declare pageChargeCents: CreationOptional<number>;
  /** whether reviewers see the team: "named", or "dual_anonymous" (hidden from reviewers, and from the chair until revealed) */
  declare teamVisibility: CreationOptional<TeamVisibility>;
  // distributed review (migration 20261202090500): each submitting team reviews k others
  declare reviewMode: CreationOptional<ReviewMode>;
  declare reviewsPerSubmitter: CreationOptional<number>;
  /** never assign a proposal competing with the reviewer's own for a telescope × moon category */
  declare separateCompetitors: CreationOptional<boolean>;
  declare unreviewedPolicy: CreationOptional<UnreviewedPolicy>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare offers?: NonAttribute<CallOffer[]>;

  static initModel(sequelize: Sequelize) {
    Call.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        semesterCode: { type: DataTypes.STRING(8), allowNull: false, unique: true },
        title: { type: DataTypes.STRING(200), allowNull: false },
        opensAt: { type: DataTypes.DATE(3), allowNull: false },
        deadlineAt: { type: DataTypes.DATE(3), allowNull: false },
        semesterStart: { type: DataTypes.DATEONLY, allowNull: false },
        semesterEnd: { type: DataTypes.DATEONLY, allowNull: false },
        pageLimit: { type: DataTypes.INTEGER, allowNull: false },
        currency: { type: DataTypes.STRING(3), allowNull: false, defaultValue: "eur" },
        accessFeePerHourCents: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        pageChargeCents: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        teamVisibility: { type: DataTypes.ENUM(...teamVisibilities), allowNull: false, defaultValue: "named" },
        reviewMode: { type: DataTypes.ENUM("panel", "distributed"), allowNull: false, defaultValue: "panel" },
        reviewsPerSubmitter: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 8 },
        separateCompetitors: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        unreviewedPolicy: { type: DataTypes.ENUM("flag", "unranked"), allowNull: false, defaultValue: "flag" },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "calls" },
    );
  }
}
