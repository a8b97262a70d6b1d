// My proposals and GET /api/v1/proposals read a fixed number of SQL statements, however many
// proposals the person has (they were 5 per proposal): counted with a Sequelize query hook on
// the built app's instance, for N and 2N proposals. A count, not a timing. GET
// /api/v1/proposals/:id checks the team once, also for a PI who holds a committee role.
import { Sequelize } from "sequelize";
import { beforeAll, describe, expect, it } from "vitest";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

let counting = false;
let statements: string[] = [];
// before the built app creates its instance (at the first request below)
Sequelize.addHook("afterInit", (instance) => {
  instance.addHook("afterQuery", (_options, query) => {
    if (counting) statements.push(String((query as { sql?: string }).sql ?? ""));
  });
});
// the mail and reminder workers run in the same process; their statements are not the request's
const worker = /outgoing_mail|review_reminders|^(START TRANSACTION|COMMIT|ROLLBACK|SET SESSION)/i;

async function statementsOf(path: string, cookie: string, which: (sql: string) => boolean = () => true) {
  const counts: number[] = [];
  for (let i = 0; i < 3; i++) {
    statements = [];
    counting = true;
    const res = await (await request()).get(path).set("Cookie", cookie);
    counting = false;
    expect(res.status).toBe(200);
    counts.push(statements.filter((s) => !worker.test(s) && which(s)).length);
  }
  return Math.min(...counts);
}

/** The access check: a membership of this user (by id or invited address), not the team list's read of every member. */
const membershipCheck = (sql: string) => /FROM `proposal_members`/.test(sql) && /`userId` = \d+/.test(sql);

let person: Awaited<ReturnType<typeof newUser>>;
let callId: number;
async function addProposals(n: number) {
  for (let i = 0; i < n; i++) await readyProposal({ user: person.user, callId, title: `Counted programme ${Date.now()}-${i}` });
}

beforeAll(async () => {
  await ensureDatabase();
  person = await newUser({ name: "Counting PI" });
  callId = (await testCall()).id;
});

describe("proposal lists: SQL statements per request", () => {
  it("do not grow from 4 to 8 proposals, on the page and in the API", { timeout: 120_000 }, async () => {
    await addProposals(4);
    const api4 = await statementsOf("/api/v1/proposals", person.cookie);
    const page4 = await statementsOf("/proposals", person.cookie);
    const listed4 = (await (await request()).get("/api/v1/proposals").set("Cookie", person.cookie)).body.proposals;
    expect(listed4).toHaveLength(4);
    expect(listed4.every((p: { requestedHours: number | null }) => p.requestedHours !== null && p.requestedHours > 0)).toBe(true);
    await addProposals(4);
    const api8 = await statementsOf("/api/v1/proposals", person.cookie);
    const page8 = await statementsOf("/proposals", person.cookie);
    expect((await (await request()).get("/api/v1/proposals").set("Cookie", person.cookie)).body.proposals).toHaveLength(8);
    expect(api8).toBe(api4);
    expect(page8).toBe(page4);
    // and stays small: session, memberships, counts, the sheets' inputs (+ the open calls on the page)
    expect(api8).toBeLessThanOrEqual(10);
  });
});

describe("one proposal in the API: the access check once", () => {
  it("reads the caller's membership in one statement, for a PI and for a PI who is also chair and reviewer", { timeout: 60_000 }, async () => {
    const plain = await newUser({ name: "Plain PI" });
    const committee = await newUser({ name: "Committee PI", roles: ["chair", "reviewer"] });
    for (const pi of [plain, committee]) {
      const { proposal } = await readyProposal({ user: pi.user, callId, title: `Checked once ${Date.now()}` });
      const res = await (await request()).get(`/api/v1/proposals/${proposal.id}`).set("Cookie", pi.cookie);
      expect(res.body.proposal.title).toMatch(/^Checked once/);
      expect(res.body.readOnly).toBeUndefined();
      expect(await statementsOf(`/api/v1/proposals/${proposal.id}`, pi.cookie, membershipCheck), pi.user.name ?? "").toBe(1);
    }
  });
});
