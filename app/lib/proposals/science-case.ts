// Browser-safe limits of the science case (the server checks them again).
export const SCIENCE_CASE_KIND = "science_case";
export const SCIENCE_CASE_MAX_BYTES = 10 * 1024 * 1024;
