// The photometric bands Nightshare knows, blue to red (Johnson–Cousins U B V R I). The one list:
// the photometry tables, the target forms, the models and the filter lists all use it.
// Pure vocabulary (no imports): the browser and the models may use it too.

export const BANDS = ["U", "B", "V", "R", "I"] as const;
export type Band = (typeof BANDS)[number];

export function isBand(band: unknown): band is Band {
  return typeof band === "string" && (BANDS as readonly string[]).includes(band);
}

/** Position in the blue-to-red order; a band we do not know sorts after all we know. */
export function bandRank(band: string): number {
  const at = (BANDS as readonly string[]).indexOf(band);
  return at < 0 ? BANDS.length : at;
}

/** Sort comparator, blue to red (unknown bands last, in the order they came). */
export const byBand = (a: string, b: string) => bandRank(a) - bandRank(b);
