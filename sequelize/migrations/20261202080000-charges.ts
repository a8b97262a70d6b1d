// Charges (SPEC §1): an access fee per accepted programme of a non-member PI institution (the
// call's fee × hours allocated in its semester) and a page charge once the PI declares the pages
// of the data-release paper (pages × the call's page rate). Paid through a checkout session of the
// payment service; `paid` only from its signed webhook. Amounts in the currency's minor unit.
import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("charges", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    proposalId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "proposals", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    callId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: "calls", key: "id" }, onDelete: "CASCADE", onUpdate: "CASCADE" },
    kind: { type: DataTypes.ENUM("access_fee", "page_charge"), allowNull: false },
    /** the semester an access fee is for; the page charge's is the call's */
    semesterCode: { type: DataTypes.STRING(8), allowNull: false },
    hours: { type: DataTypes.DOUBLE, allowNull: true },
    pages: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    /** the rate used: per hour (access fee) or per page (page charge), minor units */
    rateCents: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    amountCents: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    currency: { type: DataTypes.STRING(3), allowNull: false },
    state: { type: DataTypes.ENUM("raised", "awaiting_payment", "paid", "waived"), allowNull: false, defaultValue: "raised" },
    checkoutSessionId: { type: DataTypes.STRING(255), allowNull: true },
    checkoutExpiresAt: { type: DataTypes.DATE(3), allowNull: true },
    paidAt: { type: DataTypes.DATE(3), allowNull: true },
    paymentEventId: { type: DataTypes.STRING(255), allowNull: true },
    waivedAt: { type: DataTypes.DATE(3), allowNull: true },
    waivedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: "users", key: "id" }, onDelete: "SET NULL", onUpdate: "CASCADE" },
    waiveReason: { type: DataTypes.STRING(500), allowNull: true },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    updatedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  // one charge of a kind per proposal and semester: raising twice changes nothing
  await qi.addIndex("charges", ["proposalId", "kind", "semesterCode"], { unique: true });
  await qi.addIndex("charges", ["callId"]);
  await qi.addIndex("charges", ["checkoutSessionId"], { unique: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("charges");
}
