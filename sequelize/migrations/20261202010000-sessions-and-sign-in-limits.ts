import { DataTypes, type QueryInterface } from "sequelize";

// Server-side sessions (the cookie holds only a random id, stored here as its sha256), one lock row
// per rate-limited key (an address or a client IP) so that limit checks serialise, and the count
// of evaluated attempts per sign-in code (renamed: it now counts every evaluated attempt).
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("sessions", {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    userId: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
      onUpdate: "CASCADE",
    },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
    lastSeenAt: { type: DataTypes.DATE(3), allowNull: false },
    expiresAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("sessions", ["userId"]);
  await qi.addIndex("sessions", ["expiresAt"]);
  await qi.createTable("rate_limit_keys", {
    lockKey: { type: DataTypes.STRING(320), allowNull: false, primaryKey: true },
  });
  await qi.sequelize.query("ALTER TABLE sign_in_codes RENAME COLUMN failedAttempts TO attempts");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("ALTER TABLE sign_in_codes RENAME COLUMN attempts TO failedAttempts");
  await qi.dropTable("rate_limit_keys");
  await qi.dropTable("sessions");
}
