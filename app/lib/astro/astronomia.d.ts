// astronomia (dev dependency, Meeus reference in tests) ships no typings; only what the tests use.
declare module "astronomia" {
  export const sidereal: { mean(jd: number): number; apparent(jd: number): number };
  export const julian: { CalendarGregorianToJD(y: number, m: number, d: number): number };
  export const moonillum: { phaseAngle3(jde: number): number };
  export const base: { illuminated(i: number): number };
}
