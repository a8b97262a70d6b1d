// Distributed review as a call option: the call's review mode and its rules, the reviewer each
// proposal's team designates, and the team's helpfulness ratings of the comments it received.
import { DataTypes, type QueryInterface } from "sequelize";

const ref = (table: string, onDelete: "CASCADE" | "SET NULL" = "CASCADE", allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
  onUpdate: "CASCADE",
});

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("calls", "reviewMode", { type: DataTypes.ENUM("panel", "distributed"), allowNull: false, defaultValue: "panel" });
  await qi.addColumn("calls", "reviewsPerSubmitter", { type: DataTypes.INTEGER, allowNull: false, defaultValue: 8 });
  await qi.addColumn("calls", "separateCompetitors", { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false });
  await qi.addColumn("calls", "unreviewedPolicy", { type: DataTypes.ENUM("flag", "unranked"), allowNull: false, defaultValue: "flag" });
  await qi.sequelize.query(
    "ALTER TABLE proposals ADD COLUMN designatedReviewerId INT UNSIGNED NULL, ADD CONSTRAINT proposals_designated_reviewer_fk FOREIGN KEY (designatedReviewerId) REFERENCES users (id) ON DELETE SET NULL ON UPDATE CASCADE",
  );
  await qi.createTable("review_helpfulness", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    assignmentId: ref("review_assignments"),
    raterId: ref("users"),
    rating: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("review_helpfulness", ["assignmentId", "raterId"], { unique: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("review_helpfulness");
  // Raw SQL: Sequelize 6's removeColumn trips over the MariaDB driver's result ("Cannot delete property 'meta'").
  await qi.sequelize.query("ALTER TABLE proposals DROP FOREIGN KEY proposals_designated_reviewer_fk");
  await qi.sequelize.query("ALTER TABLE proposals DROP COLUMN designatedReviewerId");
  await qi.sequelize.query("ALTER TABLE calls DROP COLUMN unreviewedPolicy, DROP COLUMN separateCompetitors, DROP COLUMN reviewsPerSubmitter, DROP COLUMN reviewMode");
}
