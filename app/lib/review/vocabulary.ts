// Browser-safe vocabulary of the review (no imports: forms, models and the server share it).
export const reviewStatuses = ["assigned", "draft", "submitted", "conflict"] as const;
export type ReviewStatus = (typeof reviewStatuses)[number];

/** What the reviewer and the chair read for each status. */
export const reviewStatusLabels: Record<ReviewStatus, string> = {
  assigned: "to read",
  draft: "draft",
  submitted: "submitted",
  conflict: "conflict declared",
};

export const MERIT_MIN = 1;
export const MERIT_MAX = 10;
export const PI_COMMENT_MIN_WORDS = 50;
export const DEFAULT_PER_PROPOSAL = 3;
/** automatic reminders go out this long before the review deadline */
export const REMINDER_LEAD_DAYS = 3;
/** a review the chair reopens after the deadline stays open this long */
export const CHAIR_REOPEN_DAYS = 3;

export const meritCriteria = [
  { key: "science", label: "Science" },
  { key: "feasibility", label: "Feasibility" },
  { key: "legacy", label: "Legacy value" },
  { key: "overall", label: "Overall merit" },
] as const;
export type MeritKey = (typeof meritCriteria)[number]["key"];

/** 1, 1.5, … 10 */
export const meritSteps = Array.from({ length: (MERIT_MAX - MERIT_MIN) * 2 + 1 }, (_, i) => MERIT_MIN + i / 2);

// Distributed review (a call option): every submitted proposal's team reviews others of the call.
export const reviewModes = ["panel", "distributed"] as const;
export type ReviewMode = (typeof reviewModes)[number];
export const reviewModeLabels: Record<ReviewMode, string> = { panel: "By the committee's panel", distributed: "By the submitters (each team reviews others)" };
/** what happens to a proposal whose designated reviewer misses the review deadline */
export const unreviewedPolicies = ["flag", "unranked"] as const;
export type UnreviewedPolicy = (typeof unreviewedPolicies)[number];
export const unreviewedPolicyLabels: Record<UnreviewedPolicy, string> = { flag: "Flag it on the ranking board", unranked: "Flag it and leave it out of the computed ranking" };
export const DEFAULT_REVIEWS_PER_SUBMITTER = 8;
export const MAX_REVIEWS_PER_SUBMITTER = 30;
export const HELPFULNESS_MIN = 1;
export const HELPFULNESS_MAX = 5;

/** What a chair conflicted on a proposal reads in place of its grades, scores, comments and reviewers. */
export const CONFLICT_WITHHELD = "withheld: you have a conflict on this proposal";
