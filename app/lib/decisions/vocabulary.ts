// Words of the decisions that the browser also needs (no database, no React).
import type { AllocationTier, MoonCategory } from "~/lib/domain";

export const decisionOutcomes = ["accepted", "waitlisted", "declined"] as const;
export type DecisionOutcome = (typeof decisionOutcomes)[number];

export const outcomeLabels: Record<DecisionOutcome, string> = { accepted: "Accepted", waitlisted: "Waitlisted", declined: "Declined" };

export type LetterHours = { telescope: string; moonCategory: MoonCategory; semesterCode: string; hours: number };
export type LetterComment = { label: string; text: string };

/** Everything a letter shows, gathered from the locked allocation and the submitted reviews. */
export type LetterFacts = {
  proposalId: number;
  code: string;
  title: string;
  semesterCode: string;
  callTitle: string;
  piName: string;
  outcome: DecisionOutcome;
  hours: LetterHours[];
  tier: AllocationTier | null;
  charge: { id: number | null; amountCents: number; currency: string; hours: number | null; rateCents: number } | null;
  comments: LetterComment[];
  date: string;
};

/** Queued, sent, failed, retrying: a batch's mails (a retrying one failed at least once and waits). */
export type BatchProgress = {
  id: number;
  callId: number;
  kind: "all" | "resend";
  letters: number;
  total: number;
  queued: number;
  sent: number;
  failed: number;
  retrying: number;
  done: boolean;
  percent: number;
  lastError: string | null;
  createdAt: string;
};
