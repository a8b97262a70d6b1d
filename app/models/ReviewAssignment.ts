import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { reviewStatuses, type ReviewStatus } from "~/lib/review/vocabulary";
import type { Call } from "./Call";
import type { Proposal } from "./Proposal";
import type { User } from "./User";

// DECIMAL comes back from MariaDB as a string: read merits as numbers.
const meritColumn = (name: "science" | "feasibility" | "legacy" | "overall") => ({
  type: DataTypes.DECIMAL(3, 1),
  get(this: ReviewAssignment) {
    const raw: unknown = this.getDataValue(name);
    return raw === null || raw === undefined ? null : Number(raw);
  },
});

/** A reviewer assigned to a proposal, and their review (grades and comments) once they write it. */
export class ReviewAssignment extends Model<InferAttributes<ReviewAssignment>, InferCreationAttributes<ReviewAssignment>> {
  declare id: CreationOptional<number>;
  declare callId: ForeignKey<Call["id"]>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare reviewerId: ForeignKey<User["id"]>;
  declare status: CreationOptional<ReviewStatus>;
  /** null until the chair commits the call's assignments; the reviewer sees committed ones only */
  declare committedAt: CreationOptional<Date | null>;
  declare science: CreationOptional<number | null>;
  declare feasibility: CreationOptional<number | null>;
  declare legacy: CreationOptional<number | null>;
  declare overall: CreationOptional<number | null>;
  declare commentToPi: CreationOptional<string | null>;
  declare commentToCommittee: CreationOptional<string | null>;
  declare conflictReason: CreationOptional<string | null>;
  declare submittedAt: CreationOptional<Date | null>;
  /** the chair reopened this review after the deadline: the reviewer may change it until then */
  declare reopenedUntil: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare proposal?: NonAttribute<Proposal>;
  declare reviewer?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    ReviewAssignment.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        status: { type: DataTypes.ENUM(...reviewStatuses), allowNull: false, defaultValue: "assigned" },
        committedAt: DataTypes.DATE(3),
        science: meritColumn("science"),
        feasibility: meritColumn("feasibility"),
        legacy: meritColumn("legacy"),
        overall: meritColumn("overall"),
        commentToPi: DataTypes.TEXT,
        commentToCommittee: DataTypes.TEXT,
        conflictReason: DataTypes.STRING(500),
        submittedAt: DataTypes.DATE(3),
        reopenedUntil: DataTypes.DATE(3),
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "review_assignments" },
    );
  }
}
