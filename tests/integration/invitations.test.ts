import supertest from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { createProposal } from "~/lib/proposals/proposals.server";
import { signedInCookie, startUserSession } from "~/lib/auth/session.server";
import { ProposalMember, User } from "~/models/index.server";
import { form, testApp } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { codeFrom, waitForMail } from "../helpers/maildev";
import { newUser } from "../helpers/session";
import { testCall } from "./proposals-fixtures";

const app = async () => supertest(await testApp());

describe("Co-I invitations are claimed at sign-in and when sent, never by a read", () => {
  let pi: Awaited<ReturnType<typeof newUser>>;
  let proposalId: number;
  beforeAll(async () => {
    await ensureDatabase();
    pi = await newUser({ name: "Inviting PI" });
    const call = await testCall();
    proposalId = (await createProposal({ user: pi.user, callId: call.id, title: "Claimed once", abstract: "" })).id;
  });

  it("reading the proposal leaves an open invitation as it is; signing in claims it", async () => {
    const email = `claim-${Date.now()}@test.example`;
    const invite = await (await app()).post(`/proposals/${proposalId}/team`).set("Cookie", pi.cookie).type("form").send(form({ intent: "invite", email }));
    expect(invite.status).toBe(200);
    // An account and a session made behind the sign-in's back: nothing has claimed the invitation.
    const user = await User.create({ email, name: "Late Colleague", institution: "Test Institute", lastSignInAt: null });
    const cookie = (await signedInCookie(await startUserSession(user.id))).split(";")[0];
    for (const path of ["/proposals", `/proposals/${proposalId}`, `/api/v1/proposals/${proposalId}`]) {
      const res = await (await app()).get(path).set("Cookie", cookie);
      expect(res.status, path).toBe(200);
    }
    expect((await ProposalMember.findOne({ where: { proposalId, email } }))!.userId).toBeNull();

    const agent = supertest.agent(await testApp());
    expect((await agent.post("/sign-in").type("form").send(form({ intent: "send", email }))).status).toBe(302);
    const signedIn = await agent.post("/sign-in").type("form").send(form({ intent: "verify", code: codeFrom(await waitForMail(email, /sign-in code/)) }));
    expect(signedIn.headers.location).toBe("/");
    const member = (await ProposalMember.findOne({ where: { proposalId, email } }))!;
    expect(member.userId).toBe(user.id);
    expect(member.acceptedAt).not.toBeNull();
  });

  it("an invitation to an existing account is theirs at once: the team shows their name and institution", async () => {
    const colleague = await newUser({ name: "Known Colleague" });
    const invite = await (await app()).post(`/proposals/${proposalId}/team`).set("Cookie", pi.cookie).type("form").send(form({ intent: "invite", email: colleague.email }));
    expect(invite.status).toBe(200);
    expect((await ProposalMember.findOne({ where: { proposalId, email: colleague.email } }))!.userId).toBe(colleague.user.id);
    const team = await (await app()).get(`/proposals/${proposalId}/team`).set("Cookie", pi.cookie);
    expect(team.text).toContain("Known Colleague");
    expect(team.text).toContain("Test Institute");
  });
});
