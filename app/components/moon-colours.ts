// The colour of each Moon category in every chart (feasibility sheet, sky tools): one legend
// across the app. Dark time is night blue, grey a cool grey, bright the dusk amber.
import type { MoonCategory } from "~/lib/domain";

export const moonColours: Record<MoonCategory, string> = { dark: "#13213a", grey: "#7c8aa0", bright: "#e8a849" };
