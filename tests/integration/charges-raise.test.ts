// Raising the access fee on acceptance: a non-member PI's accepted programme owes the call's fee ×
// its hours in the call's semester (worked by hand below); a member owes nothing; raising twice
// changes nothing; a proposal not accepted owes nothing.
import { beforeAll, describe, expect, it } from "vitest";
import { accessFeeCents, raiseAccessFee } from "~/lib/payments/charges.server";
import { Allocation, Call, Charge, Proposal, sequelize, Telescope, User } from "~/models/index.server";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

let call: Call;
let telescopeId: number;

beforeAll(async () => {
  await ensureDatabase();
  call = await testCall();
  await call.update({ accessFeePerHourCents: 12_500, currency: "EUR" });
  telescopeId = (await Telescope.findOne({ order: [["id", "ASC"]] }))!.id;
});

async function accepted(member: boolean, hours: number[]) {
  const pi = await newUser({ name: member ? "Member PI" : "Visiting PI" });
  await User.update({ isMemberInstitution: member, institution: member ? "Consortium Institute" : "Visiting Institute" }, { where: { id: pi.user.id } });
  const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Charged programme ${member ? "member" : "visitor"} ${hours.join("+")}` });
  await Proposal.update({ status: "accepted" }, { where: { id: proposal.id } });
  const cells = ["dark", "grey", "bright"] as const;
  for (const [i, h] of hours.entries()) await Allocation.create({ callId: call.id, proposalId: proposal.id, telescopeId, moonCategory: cells[i], semesterCode: call.semesterCode, hours: h });
  // a later semester's hours are that semester's call's to charge
  await Allocation.create({ callId: call.id, proposalId: proposal.id, telescopeId, moonCategory: "dark", semesterCode: "2999B", hours: 50 });
  return proposal.id;
}

describe("raising the access fee", () => {
  it("charges a non-member the fee × hours of the call's semester, once", async () => {
    const id = await accepted(false, [3.5, 1.25]);
    const charge = await sequelize.transaction((transaction) => raiseAccessFee({ proposalId: id, transaction }));
    // (3.5 + 1.25) h × 125.00 EUR/h = 593.75 EUR = 59 375 cents
    expect(charge?.amountCents).toBe(59_375);
    expect(charge?.hours).toBe(4.75);
    expect(charge?.currency).toBe("EUR");
    expect(charge?.state).toBe("raised");
    await sequelize.transaction((transaction) => raiseAccessFee({ proposalId: id, transaction }));
    expect(await Charge.count({ where: { proposalId: id } })).toBe(1);
  });

  it("charges a member institution nothing, and nothing before acceptance", async () => {
    const member = await accepted(true, [10]);
    expect(await sequelize.transaction((transaction) => raiseAccessFee({ proposalId: member, transaction }))).toBeNull();
    const visitor = await accepted(false, [2]);
    await Proposal.update({ status: "waitlisted" }, { where: { id: visitor } });
    expect(await sequelize.transaction((transaction) => raiseAccessFee({ proposalId: visitor, transaction }))).toBeNull();
    expect(await Charge.count({ where: { proposalId: [member, visitor] } })).toBe(0);
  });

  it("rounds to the nearest minor unit", () => {
    // 0.333 h × 125.00 = 41.625 → 41.63 (half away from zero for positive amounts)
    expect(accessFeeCents(0.333, 12_500)).toBe(4163);
  });
});
