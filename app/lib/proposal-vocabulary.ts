// Browser-safe vocabulary of the PI's workspace (no server imports: the forms use it too).

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

export const SEMESTER_CODE = /^\d{4}[AB]$/;

/** The call's own semester and the next `count − 1` ones: 2027A → 2027A, 2027B, 2028A, 2028B. */
export function upcomingSemesters(first: string, count = 4) {
  if (!SEMESTER_CODE.test(first)) return [first];
  let year = Number(first.slice(0, 4));
  let half = first.slice(4);
  const out: string[] = [];
  for (let i = 0; i < count; i++) {
    out.push(`${year}${half}`);
    if (half === "A") half = "B";
    else {
      half = "A";
      year++;
    }
  }
  return out;
}

export const memberRoleLabels = { pi: "PI", coi: "Co-I" } as const;
