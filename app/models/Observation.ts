import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { moonCategories, type MoonCategory } from "~/lib/domain";
import type { Filter } from "./Filter";
import type { Instrument } from "./Instrument";
import type { PlannedEpoch } from "./PlannedEpoch";
import type { Proposal } from "./Proposal";
import type { Target } from "./Target";

/** What to take of one target: either an SNR goal or an exposure time, per frame. */
export class Observation extends Model<InferAttributes<Observation>, InferCreationAttributes<Observation>> {
  declare id: CreationOptional<number>;
  declare proposalId: ForeignKey<Proposal["id"]>;
  declare targetId: ForeignKey<Target["id"]>;
  declare instrumentId: ForeignKey<Instrument["id"]>;
  declare filterId: ForeignKey<Filter["id"]>;
  declare snrGoal: number | null;
  declare exposureSeconds: number | null;
  declare framesPerEpoch: CreationOptional<number>;
  declare epochsPerSemester: CreationOptional<number>;
  declare baselineYears: number | null;
  declare requiredPmPrecisionMasPerYr: number | null;
  declare moonCategory: CreationOptional<MoonCategory>;
  declare maxAirmass: CreationOptional<number>;
  declare seeingArcsec: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare target?: NonAttribute<Target>;
  declare instrument?: NonAttribute<Instrument>;
  declare filter?: NonAttribute<Filter>;
  declare epochs?: NonAttribute<PlannedEpoch[]>;

  static initModel(sequelize: Sequelize) {
    Observation.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        snrGoal: DataTypes.DOUBLE,
        exposureSeconds: DataTypes.DOUBLE,
        framesPerEpoch: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        epochsPerSemester: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        baselineYears: DataTypes.DOUBLE,
        requiredPmPrecisionMasPerYr: DataTypes.DOUBLE,
        moonCategory: { type: DataTypes.ENUM(...moonCategories), allowNull: false, defaultValue: "dark" },
        maxAirmass: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 2 },
        seeingArcsec: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1.2 },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: "observations" },
    );
  }
}

/** An observation's settings as plain data: the fields the feasibility sheet and the observations tab both read. */
export function observationSettings(o: Observation) {
  return {
    id: o.id,
    targetId: o.targetId,
    instrumentId: o.instrumentId,
    filterId: o.filterId,
    snrGoal: o.snrGoal,
    exposureSeconds: o.exposureSeconds,
    framesPerEpoch: o.framesPerEpoch,
    epochsPerSemester: o.epochsPerSemester,
    baselineYears: o.baselineYears,
    requiredPmPrecisionMasPerYr: o.requiredPmPrecisionMasPerYr,
    moonCategory: o.moonCategory,
    maxAirmass: o.maxAirmass,
    seeingArcsec: o.seeingArcsec,
  };
}
