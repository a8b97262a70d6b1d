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
