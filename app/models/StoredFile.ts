import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { Proposal } from "./Proposal";
import type { User } from "./User";

/** An uploaded or generated file, kept in the database with its checksum; never overwritten. */
export class StoredFile extends Model<InferAttributes<StoredFile>, InferCreationAttributes<StoredFile>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]> | null;
  declare kind: string;
  declare filename: string;
  declare contentType: string;
  declare sizeBytes: number;
  declare sha256: string;
  declare pageCount: number | null;
  declare data: Buffer;
  declare uploadedById: ForeignKey<User["id"]> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    StoredFile.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        filename: { type: DataTypes.STRING(255), allowNull: false },
        contentType: { type: DataTypes.STRING(100), allowNull: false },
        sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
        sha256: { type: DataTypes.CHAR(64), allowNull: false },
        pageCount: DataTypes.INTEGER,
        data: { type: DataTypes.BLOB("long"), allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "stored_files" },
    );
  }
}
