import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { allocationTiers, type AllocationTier } from "~/lib/domain";
import type { Call } from "./Call";
import type { Proposal } from "./Proposal";

/** The chair's choices for one proposal on the ranking board. */
export class BoardEntry extends Model<InferAttributes<BoardEntry>, InferCreationAttributes<BoardEntry>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  /** The chair's position (1 = top); null keeps the computed rank. */
  declare chairRank: number | null;
  declare chairRankReason: string | null;
  declare tier: AllocationTier | null;
  declare waitlisted: CreationOptional<boolean>;
  /** The chair set its hours, tier or waitlist by hand: fill by rank keeps them. */
  declare allocatedByHand: CreationOptional<boolean>;
  /** Who set `chairRank` (null: nobody, or before this was recorded). */
  declare chairRankById: CreationOptional<number | null>;
  /** Who set the hand-set allocation (null: nobody, or before this was recorded). */
  declare allocatedByHandById: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BoardEntry.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        chairRank: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        chairRankReason: { type: DataTypes.STRING(500), allowNull: true },
        tier: { type: DataTypes.ENUM(...allocationTiers), allowNull: true },
        waitlisted: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        allocatedByHand: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        chairRankById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        allocatedByHandById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "board_entries" },
    );
  }
}
