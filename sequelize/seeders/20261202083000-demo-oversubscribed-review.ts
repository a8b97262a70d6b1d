// Demo: the call in review asks more than it offers. Its programmes request a few hours each, far
// less than the observatory's usual offer, so nothing would be in doubt on its ranking board. The
// office offers this call, in every telescope × moon category its proposals ask for, 1/1.6 of the
// hours they request but at least the largest single request (plus what earlier locked calls
// already committed there): the board then shows oversubscription, an allocation line that cuts
// the list where the order decides, rank intervals that matter and a coin-flip band. Invented,
// like every number of the demo.
// Idempotent: a call whose offers were already cut is left alone.
import { callBoard } from "~/lib/allocation/board.server";
import { Call, CallOffer } from "~/models/index.server";
import { demoCallPlan } from "./20261201000100-demo-observatory";

export const DEMO_REVIEW_OVERSUBSCRIPTION = 1.6;

export async function up() {
  const call = await Call.findOne({ where: { semesterCode: demoCallPlan(new Date()).review.semesterCode } });
  if (!call) return;
  const board = await callBoard({ callId: call.id });
  for (const o of board.oversubscription) {
    if (!(o.requestedHours > 0)) continue;
    let largest = 0;
    for (const p of board.proposals) {
      for (const r of p.requested) if (r.semesterCode === call.semesterCode && r.telescopeId === o.telescopeId && r.moonCategory === o.moonCategory) largest = Math.max(largest, r.hours);
    }
    const wanted = Math.ceil((o.committedHours + Math.max(largest, o.requestedHours / DEMO_REVIEW_OVERSUBSCRIPTION)) * 10) / 10;
    const offer = await CallOffer.findOne({ where: { callId: call.id, telescopeId: o.telescopeId, moonCategory: o.moonCategory } });
    if (offer && offer.hoursOffered > wanted) await offer.update({ hoursOffered: wanted });
  }
}

export async function down() {}
