// What the call pages need around the form: the observatory's zone, the telescopes for the grid,
// and a stored call turned back into the form's wall-clock values.
import { listTelescopes, observatoryTimeZone, type getCall } from "./office.server";
import { utcToZonedLocal } from "../zoned-time";
import { semesterAfter } from "../semesters";
import { DEFAULT_REVIEWS_PER_SUBMITTER } from "../review/vocabulary";
import type { CallFormValues } from "~/lib/schemas/office";

export async function callFormContext() {
  const [timeZone, telescopes] = await Promise.all([observatoryTimeZone(), listTelescopes()]);
  return { timeZone, telescopes: telescopes.map((t) => ({ id: t.id, name: t.name, siteName: t.siteName })) };
}

export function callToForm(call: Awaited<ReturnType<typeof getCall>>, timeZone: string): CallFormValues {
  return {
    semesterCode: call.semesterCode,
    title: call.title,
    opensAt: utcToZonedLocal(call.opensAt, timeZone),
    deadlineAt: utcToZonedLocal(call.deadlineAt, timeZone),
    semesterStart: call.semesterStart,
    semesterEnd: call.semesterEnd,
    pageLimit: call.pageLimit,
    currency: call.currency,
    accessFee: call.accessFeePerHourCents / 100,
    pageCharge: call.pageChargeCents / 100,
    reviewMode: call.reviewMode,
    reviewsPerSubmitter: call.reviewsPerSubmitter,
    separateCompetitors: call.separateCompetitors,
    unreviewedPolicy: call.unreviewedPolicy,
    offers: call.offers,
    teamVisibility: call.teamVisibility,
  };
}

/** A blank form for the next semester after the latest call (a starting point, all editable). */
export function emptyCallForm(latest: { semesterCode: string; semesterEnd: string } | null): CallFormValues {
  return {
    semesterCode: "",
    title: "",
    opensAt: "",
    deadlineAt: "",
    semesterStart: "",
    semesterEnd: "",
    pageLimit: 4,
    currency: "eur",
    accessFee: 0,
    pageCharge: 0,
    reviewMode: "panel",
    reviewsPerSubmitter: DEFAULT_REVIEWS_PER_SUBMITTER,
    separateCompetitors: false,
    unreviewedPolicy: "flag",
    offers: {},
    teamVisibility: "named",
    ...(latest ? nextSemester(latest) : {}),
  };
}

function nextSemester(latest: { semesterCode: string; semesterEnd: string }) {
  const next = semesterAfter({ code: latest.semesterCode, end: latest.semesterEnd });
  return { semesterCode: next.code, title: `Call for proposals ${next.code}`, semesterStart: next.start, semesterEnd: next.end };
}
