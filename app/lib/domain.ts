// Vocabulary shared by the server, the database models and the browser (no imports on purpose).
export const grantableRoles = ["reviewer", "chair", "admin", "observer"] as const;
export type GrantableRole = (typeof grantableRoles)[number];

export const moonCategories = ["dark", "grey", "bright"] as const;
export type MoonCategory = (typeof moonCategories)[number];

export const proposalStatuses = ["draft", "submitted", "in_review", "accepted", "waitlisted", "declined", "withdrawn"] as const;
export type ProposalStatus = (typeof proposalStatuses)[number];

export const proposalStatusLabels: Record<ProposalStatus, string> = {
  draft: "draft",
  submitted: "submitted",
  in_review: "in review",
  accepted: "accepted",
  waitlisted: "waitlisted",
  declined: "declined",
  withdrawn: "withdrawn",
};

/** Allocation tiers, in the order the semester is scheduled (SPEC §6). */
export const allocationTiers = ["assured", "queue", "filler"] as const;
export type AllocationTier = (typeof allocationTiers)[number];

/** Why an epoch was lost (the epoch log). */
export const lostCauses = ["weather", "technical"] as const;
export type LostCause = (typeof lostCauses)[number];

/** Whether a call's reviewers see the team (dual-anonymous: hidden from reviewers, and from the chair until the reveal). */
export const teamVisibilities = ["named", "dual_anonymous"] as const;
export type TeamVisibility = (typeof teamVisibilities)[number];
export const teamVisibilityLabels: Record<TeamVisibility, string> = {
  named: "Named: reviewers see the team",
  dual_anonymous: "Dual-anonymous: reviewers never see the team",
};
/** Shown where a dual-anonymous call's team (a PI's institution) would be, before the chair's reveal. */
export const HIDDEN_TEAM = "hidden";
