import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { byBand } from "~/lib/astro/bands";
import type { Proposal } from "./Proposal";

/** A target of a proposal: ICRS/J2000 position, optional proper motion (μα* includes cos δ). */
export class Target extends Model<InferAttributes<Target>, InferCreationAttributes<Target>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare name: string;
  declare raDeg: number;
  declare decDeg: number;
  declare pmRaMasPerYr: number | null;
  declare pmDecMasPerYr: number | null;
  /** Magnitudes by band (band → magnitude): the truth. */
  declare magnitudes: CreationOptional<Record<string, number> | null>;
  /** Mirror of the first entry of `magnitudes` (U B V R I order), kept by the hooks below for older readers. */
  declare magnitude: CreationOptional<number | null>;
  declare band: CreationOptional<string | null>;
  declare notes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Target.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        raDeg: { type: DataTypes.DOUBLE, allowNull: false },
        decDeg: { type: DataTypes.DOUBLE, allowNull: false },
        pmRaMasPerYr: DataTypes.DOUBLE,
        pmDecMasPerYr: DataTypes.DOUBLE,
        magnitudes: { type: DataTypes.JSON, allowNull: true },
        magnitude: DataTypes.DOUBLE,
        band: DataTypes.STRING(16),
        notes: DataTypes.TEXT,
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      {
        sequelize,
        tableName: "targets",
        hooks: {
          beforeSave: (t) => syncMagnitudes(t),
          beforeBulkCreate: (targets) => targets.forEach(syncMagnitudes),
        },
      },
    );
  }
}

/** Magnitudes of a target as a plain map (MariaDB may hand JSON back as text). */
export function magnitudesOf(t: { magnitudes?: Record<string, number> | string | null }): Record<string, number> {
  const raw = typeof t.magnitudes === "string" ? (JSON.parse(t.magnitudes) as unknown) : t.magnitudes;
  if (!raw || typeof raw !== "object") return {};
  const out: Record<string, number> = {};
  for (const [band, m] of Object.entries(raw as Record<string, unknown>)) if (typeof m === "number" && Number.isFinite(m)) out[band] = m;
  return out;
}

/**
 * `magnitudes` is the truth; `magnitude`/`band` mirror its first band. A writer that sets only
 * the older pair (the demo seeder, older code) gets `magnitudes` built from it.
 */
function syncMagnitudes(t: Target) {
  const isNew = t.isNewRecord;
  const setMap = isNew ? t.getDataValue("magnitudes") !== undefined && t.getDataValue("magnitudes") !== null : t.changed("magnitudes");
  if (setMap) {
    const map = magnitudesOf(t);
    t.magnitudes = map;
    const first = Object.keys(map).sort(byBand)[0];
    t.magnitude = first === undefined ? null : map[first];
    t.band = first ?? null;
  } else if (isNew || t.changed("magnitude") || t.changed("band")) {
    const m = t.getDataValue("magnitude");
    const b = t.getDataValue("band");
    t.magnitudes = m !== null && m !== undefined && b ? { [b]: m } : {};
  }
}

/** A target as the sheet (and the targets tab, which adds its own columns) reads it. */
export function sheetTarget(t: Target) {
  return {
    id: t.id,
    name: t.name,
    raDeg: t.raDeg,
    decDeg: t.decDeg,
    pmRaMasPerYr: t.pmRaMasPerYr,
    pmDecMasPerYr: t.pmDecMasPerYr,
    magnitudes: magnitudesOf(t),
    magnitude: t.magnitude,
    band: t.band,
  };
}
