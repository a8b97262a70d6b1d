// Browser-safe vocabulary of the PI's workspace (no server imports: the forms use it too).
import { shortSemester } from "~/lib/semesters";

/** Our own list of science categories; a proposal picks exactly one. */
export const scienceCategories = [
  { value: "stellar-populations", label: "Stellar populations" },
  { value: "clusters-astrometry", label: "Star clusters and astrometry" },
  { value: "stellar-physics", label: "Stars and stellar physics" },
  { value: "galaxies", label: "Galaxies" },
  { value: "exoplanets", label: "Exoplanets" },
  { value: "transients", label: "Transients and variables" },
  { value: "solar-system", label: "Solar system" },
  { value: "other", label: "Other" },
] as const;
export type ScienceCategory = (typeof scienceCategories)[number]["value"];
export const scienceCategoryValues = scienceCategories.map((c) => c.value) as [ScienceCategory, ...ScienceCategory[]];

export function scienceCategoryLabel(value: string | null | undefined) {
  return scienceCategories.find((c) => c.value === value)?.label ?? null;
}

export const ABSTRACT_WORD_LIMIT = 250;

export function wordCount(text: string) {
  const words = text.trim().split(/\s+/).filter(Boolean);
  return words.length;
}

export const memberRoleLabels = { pi: "PI", coi: "Co-I" } as const;

/**
 * Nightshare's proposal code: the serial within the call first, zero-padded to three digits,
 * then the short semester — `014/27A`, read "proposal 14 of 27A".
 */
export function proposalCode(semesterCode: string, serial: number) {
  return `${String(serial).padStart(3, "0")}/${shortSemester(semesterCode)}`;
}

/** The code as it may stand in a file name: `014/27A` → `014-27A`. */
export function codeForFileName(code: string) {
  return code.replaceAll("/", "-");
}
