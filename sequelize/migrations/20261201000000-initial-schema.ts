import { DataTypes, type QueryInterface } from "sequelize";

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const ref = (table: string, onDelete: "CASCADE" | "SET NULL" | "RESTRICT" = "CASCADE", allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
  onUpdate: "CASCADE",
});
const timestamps = {
  createdAt: { type: DataTypes.DATE(3), allowNull: false },
  updatedAt: { type: DataTypes.DATE(3), allowNull: false },
};
const double = (allowNull = false) => ({ type: DataTypes.DOUBLE, allowNull });
const moonCategory = DataTypes.ENUM("dark", "grey", "bright");

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("users", {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(200), allowNull: true },
    institution: { type: DataTypes.STRING(200), allowNull: true },
    isMemberInstitution: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    lastSignInAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.createTable("role_grants", {
    id,
    userId: ref("users"),
    role: { type: DataTypes.ENUM("reviewer", "chair", "admin"), allowNull: false },
    grantedById: ref("users", "SET NULL", true),
    ...timestamps,
  });
  await qi.addIndex("role_grants", ["userId", "role"], { unique: true });

  await qi.createTable("telescopes", {
    id,
    name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
    siteName: { type: DataTypes.STRING(120), allowNull: false },
    latitudeDeg: double(),
    longitudeDeg: double(),
    elevationM: double(),
    timeZone: { type: DataTypes.STRING(64), allowNull: false },
    apertureM: double(),
    centralObstruction: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    ...timestamps,
  });
  await qi.createTable("instruments", {
    id,
    telescopeId: ref("telescopes"),
    name: { type: DataTypes.STRING(120), allowNull: false },
    pixelScaleArcsec: double(),
    readNoiseE: double(),
    darkEPerPixelPerS: double(),
    gainEPerAdu: double(),
    fullWellE: double(),
    readoutSeconds: double(),
    acquisitionSeconds: double(),
    astrometricFloorMas: double(),
    throughput: double(),
    ...timestamps,
  });
  await qi.createTable("filters", {
    id,
    instrumentId: ref("instruments"),
    band: { type: DataTypes.STRING(16), allowNull: false },
    zeroPointPhotons: { ...double(), comment: "photons s^-1 cm^-2 at magnitude 0 over the band" },
    extinctionMagPerAirmass: double(),
    skyDarkMag: double(),
    skyGreyMag: double(),
    skyBrightMag: double(),
    ...timestamps,
  });
  await qi.addIndex("filters", ["instrumentId", "band"], { unique: true });

  await qi.createTable("calls", {
    id,
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
    ...timestamps,
  });
  await qi.createTable("call_offers", {
    id,
    callId: ref("calls"),
    telescopeId: ref("telescopes", "RESTRICT"),
    moonCategory: { type: moonCategory, allowNull: false },
    hoursOffered: double(),
    ...timestamps,
  });
  await qi.addIndex("call_offers", ["callId", "telescopeId", "moonCategory"], { unique: true });

  await qi.createTable("proposals", {
    id,
    callId: ref("calls", "RESTRICT"),
    code: { type: DataTypes.STRING(20), allowNull: true, unique: true },
    serial: { type: DataTypes.INTEGER, allowNull: true },
    title: { type: DataTypes.STRING(300), allowNull: false },
    abstract: { type: DataTypes.TEXT, allowNull: false },
    scienceCategory: { type: DataTypes.STRING(60), allowNull: true },
    status: {
      type: DataTypes.ENUM("draft", "submitted", "in_review", "accepted", "waitlisted", "declined", "withdrawn"),
      allowNull: false,
      defaultValue: "draft",
    },
    isMultiSemester: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    semestersRequested: { type: DataTypes.JSON, allowNull: false },
    isTargetOfOpportunity: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    submittedAt: { type: DataTypes.DATE(3), allowNull: true },
    createdById: ref("users", "RESTRICT"),
    ...timestamps,
  });
  await qi.addIndex("proposals", ["callId", "serial"], { unique: true });
  await qi.createTable("proposal_members", {
    id,
    proposalId: ref("proposals"),
    userId: ref("users", "CASCADE", true),
    email: { type: DataTypes.STRING(254), allowNull: false },
    role: { type: DataTypes.ENUM("pi", "coi"), allowNull: false },
    acceptedAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("proposal_members", ["proposalId", "email"], { unique: true });
  await qi.addIndex("proposal_members", ["email"]);

  await qi.createTable("targets", {
    id,
    proposalId: ref("proposals"),
    name: { type: DataTypes.STRING(120), allowNull: false },
    raDeg: double(),
    decDeg: double(),
    pmRaMasPerYr: { type: DataTypes.DOUBLE, allowNull: true },
    pmDecMasPerYr: { type: DataTypes.DOUBLE, allowNull: true },
    magnitude: { type: DataTypes.DOUBLE, allowNull: true },
    band: { type: DataTypes.STRING(16), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.createTable("observations", {
    id,
    proposalId: ref("proposals"),
    targetId: ref("targets"),
    instrumentId: ref("instruments", "RESTRICT"),
    filterId: ref("filters", "RESTRICT"),
    snrGoal: { type: DataTypes.DOUBLE, allowNull: true },
    exposureSeconds: { type: DataTypes.DOUBLE, allowNull: true },
    framesPerEpoch: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    epochsPerSemester: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    baselineYears: { type: DataTypes.DOUBLE, allowNull: true },
    requiredPmPrecisionMasPerYr: { type: DataTypes.DOUBLE, allowNull: true },
    moonCategory: { type: moonCategory, allowNull: false, defaultValue: "dark" },
    maxAirmass: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 2 },
    seeingArcsec: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1.2 },
    ...timestamps,
  });
  await qi.createTable("planned_epochs", {
    id,
    observationId: ref("observations"),
    date: { type: DataTypes.DATEONLY, allowNull: false },
    semesterCode: { type: DataTypes.STRING(8), allowNull: false },
    status: { type: DataTypes.ENUM("planned", "observed", "missed"), allowNull: false, defaultValue: "planned" },
    observedAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.createTable("stored_files", {
    id,
    proposalId: ref("proposals", "CASCADE", true),
    kind: { type: DataTypes.STRING(40), allowNull: false },
    filename: { type: DataTypes.STRING(255), allowNull: false },
    contentType: { type: DataTypes.STRING(100), allowNull: false },
    sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.CHAR(64), allowNull: false },
    pageCount: { type: DataTypes.INTEGER, allowNull: true },
    data: { type: DataTypes.BLOB("long"), allowNull: false },
    uploadedById: ref("users", "SET NULL", true),
    ...timestamps,
  });
  await qi.addIndex("stored_files", ["proposalId", "kind"]);

  await qi.createTable("outgoing_mail", {
    id,
    toAddress: { type: DataTypes.STRING(254), allowNull: false },
    subject: { type: DataTypes.STRING(300), allowNull: false },
    textBody: { type: DataTypes.TEXT("medium"), allowNull: false },
    htmlBody: { type: DataTypes.TEXT("medium"), allowNull: true },
    attachments: { type: DataTypes.JSON, allowNull: true },
    status: { type: DataTypes.ENUM("pending", "sent", "failed"), allowNull: false, defaultValue: "pending" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    nextAttemptAt: { type: DataTypes.DATE(3), allowNull: false },
    lastError: { type: DataTypes.TEXT, allowNull: true },
    messageId: { type: DataTypes.STRING(300), allowNull: true },
    sentAt: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("outgoing_mail", ["status", "nextAttemptAt"]);

  await qi.createTable("audit_log", {
    id,
    actorId: ref("users", "SET NULL", true),
    action: { type: DataTypes.STRING(80), allowNull: false },
    entityType: { type: DataTypes.STRING(60), allowNull: false },
    entityId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    proposalId: ref("proposals", "CASCADE", true),
    details: { type: DataTypes.JSON, allowNull: true },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("audit_log", ["entityType", "entityId"]);

  await qi.createTable("sign_in_requests", {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false },
    ip: { type: DataTypes.STRING(64), allowNull: false },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex("sign_in_requests", ["email", "createdAt"]);
  await qi.addIndex("sign_in_requests", ["ip", "createdAt"]);
  await qi.createTable("sign_in_codes", {
    id,
    tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    email: { type: DataTypes.STRING(254), allowNull: false },
    failedAttempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    usedAt: { type: DataTypes.DATE(3), allowNull: true },
    createdAt: { type: DataTypes.DATE(3), allowNull: false },
  });

  await qi.createTable("payment_events", {
    id,
    eventId: { type: DataTypes.STRING(100), allowNull: false, unique: true },
    type: { type: DataTypes.STRING(100), allowNull: false },
    objectId: { type: DataTypes.STRING(100), allowNull: true },
    payload: { type: DataTypes.JSON, allowNull: false },
    receivedAt: { type: DataTypes.DATE(3), allowNull: false },
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const table of [
    "payment_events", "sign_in_codes", "sign_in_requests", "audit_log", "outgoing_mail",
    "stored_files", "planned_epochs", "observations", "targets", "proposal_members", "proposals",
    "call_offers", "calls", "filters", "instruments", "telescopes", "role_grants", "users",
  ]) {
    await qi.dropTable(table);
  }
}
