// Decisions (SPEC §1): the office's letter templates per outcome, one decision letter per
// proposal (what was sent, when, with the access fee raised in the same transaction), the batches
// that queued them, and which outgoing mail each batch queued (its progress is those rows' states).
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("decision_templates", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    outcome: { type: DataTypes.ENUM("accepted", "waitlisted", "declined"), allowNull: false, unique: true },
    subject: { type: DataTypes.STRING(200), allowNull: false },
    body: { type: DataTypes.TEXT, allowNull: false },
    updatedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL", onUpdate: "CASCADE" },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.createTable("decision_batches", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    callId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "calls", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    kind: { type: DataTypes.ENUM("all", "resend"), allowNull: false },
    createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL", onUpdate: "CASCADE" },
    letters: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.createTable("decision_letters", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    proposalId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, unique: true, references: { model: "proposals", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    callId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "calls", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    batchId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: "decision_batches", key: "id" }, onDelete: "SET NULL", onUpdate: "CASCADE" },
    outcome: { type: DataTypes.ENUM("accepted", "waitlisted", "declined"), allowNull: false },
    subject: { type: DataTypes.STRING(200), allowNull: false },
    /** the letter as sent (template filled); the PDF and the PI's page are built from it */
    body: { type: DataTypes.TEXT("medium"), allowNull: false },
    /** the facts the letter showed: hours, tier, charge, anonymised comments */
    facts: { type: DataTypes.JSON, allowNull: false },
    chargeId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: "charges", key: "id" }, onDelete: "SET NULL", onUpdate: "CASCADE" },
    sentAt: { type: DataTypes.DATE(3), allowNull: false },
    sentById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL", onUpdate: "CASCADE" },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("decision_letters", ["callId"]);
  await qi.createTable("decision_mails", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    batchId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "decision_batches", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    letterId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "decision_letters", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    outgoingMailId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "outgoing_mail", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    toAddress: { type: DataTypes.STRING(254), allowNull: false },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("decision_mails", ["batchId"]);
  await qi.addIndex("decision_mails", ["letterId"]);
  await qi.addColumn("proposals", "decisionSentAt", { type: DataTypes.DATE(3), allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Raw SQL: Sequelize 6's removeColumn trips over the MariaDB driver's result ("Cannot delete property 'meta'").
  await qi.sequelize.query("ALTER TABLE proposals DROP COLUMN decisionSentAt");
  await qi.dropTable("decision_mails");
  await qi.dropTable("decision_letters");
  await qi.dropTable("decision_batches");
  await qi.dropTable("decision_templates");
}
