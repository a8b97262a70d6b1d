// Issue 7, item 9: bad input is a 4xx with a message, never a 500: malformed ids on the
// workspace's and the office's actions, over-long text, JSON or broken multipart sent to a form
// action, over-long proposal titles in the Co-I invitation's mail subject.
import { beforeAll, describe, expect, it } from "vitest";
import { Instrument, OutgoingMail, Target } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { goodTarget, readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let pi: Person;
let admin: Person;
let proposalId: number;
let instrumentId: number;

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Bad Input PI" });
  admin = await newUser({ name: "Bad Input Admin", roles: ["admin"] });
  const call = await testCall();
  proposalId = (await readyProposal({ user: pi.user, callId: call.id, title: "Bad input test programme" })).proposal.id;
  instrumentId = (await Instrument.findOne())!.id;
});

const MALFORMED_IDS = ["abc", "NaN", "-1", "0", "1e3", "Infinity", "12abc", "99999999999999999999", ""];

async function post(path: string, cookie: string, values: Record<string, string>) {
  return (await request()).post(path).set("Cookie", cookie).set("Content-Type", "application/x-www-form-urlencoded").send(form(values));
}

describe("malformed ids on form actions", () => {
  it.each(MALFORMED_IDS)("targetId=%j on update and delete of a target is a 400 with a message", async (id) => {
    for (const intent of ["update", "delete"]) {
      const res = await post(`/proposals/${proposalId}/targets`, pi.cookie, { intent, targetId: id, ...goodTarget });
      expect(res.status, `${intent} ${id}`).toBe(400);
      expect(res.text).toContain("must be a positive whole number");
    }
  });

  it.each(MALFORMED_IDS)("observationId=%j on delete of an observation is a 400", async (id) => {
    const res = await post(`/proposals/${proposalId}/observations`, pi.cookie, { intent: "delete", observationId: id });
    expect(res.status).toBe(400);
    expect(res.text).toContain("must be a positive whole number");
  });

  it.each(["abc", "-3", "1e3"])("filterId=%j on the office's filter actions is a 400", async (id) => {
    for (const intent of ["updateFilter", "deleteFilter"]) {
      const res = await post(`/admin/instruments/${instrumentId}`, admin.cookie, { intent, filterId: id, band: "V" });
      expect(res.status, `${intent} ${id}`).toBe(400);
      expect(res.text).toContain("filter id must be a positive whole number");
    }
  });

  it("memberId=abc on the team page is a 400 with the field's message", async () => {
    const res = await post(`/proposals/${proposalId}/team`, pi.cookie, { intent: "remove", memberId: "abc" });
    expect(res.status).toBe(400);
    expect(res.text).toContain("Choose a member.");
  });
});

describe("over-long text", () => {
  it("target notes over the column size are a 400 with the field's message, keeping the rest", async () => {
    const res = await post(`/proposals/${proposalId}/targets`, pi.cookie, { intent: "create", ...goodTarget, name: "Long notes target", notes: "n".repeat(70_000) });
    expect(res.status).toBe(400);
    expect(res.text).toContain("Keep the notes under 10,000 characters.");
  });

  it("notes of 10 000 four-byte characters (40 kB) are stored", async () => {
    const res = await post(`/proposals/${proposalId}/targets`, pi.cookie, { intent: "create", ...goodTarget, name: "Wide notes target", ra: "02:00:00", dec: "+05:00:00", notes: "𝛼".repeat(10_000) });
    expect(res.status).toBe(200);
    const saved = await Target.findOne({ where: { proposalId, name: "Wide notes target" } });
    expect([...(saved?.notes ?? "")].length).toBe(10_000);
  });

  it("a proposal title of 300 characters still sends the Co-I invitation, with a fitted subject", async () => {
    const title = `${"Very long title ".repeat(18)}end`.slice(0, 300);
    const created = await post("/proposals/new", pi.cookie, { intent: "create", callId: String((await testCall()).id), title });
    expect(created.status).toBe(302);
    const id = Number(/\/proposals\/(\d+)/.exec(created.headers.location)![1]);
    const email = `long-title-${Date.now()}@test.example`;
    const res = await post(`/proposals/${id}/team`, pi.cookie, { intent: "invite", email });
    expect(res.status).toBe(200);
    const mail = await OutgoingMail.findOne({ where: { toAddress: email } });
    expect(mail).not.toBeNull();
    expect([...mail!.subject].length).toBeLessThanOrEqual(200);
    expect(mail!.subject.endsWith("…")).toBe(true);
    expect(mail!.textBody).toContain(title);
  });

  it("a title over 300 characters is a 400 with the field's message", async () => {
    const res = await post("/proposals/new", pi.cookie, { intent: "create", callId: String((await testCall()).id), title: "t".repeat(301) });
    expect(res.status).toBe(400);
    expect(res.text).toContain("Keep the title under 300 characters.");
  });
});

describe("bodies that are not forms", () => {
  it("JSON sent to a form action is a 400, not a 500", async () => {
    const res = await (await request()).post(`/proposals/${proposalId}/targets`).set("Cookie", pi.cookie).set("Content-Type", "application/json").send(JSON.stringify({ intent: "delete", targetId: 1 }));
    expect(res.status).toBe(400);
  });

  it("a broken multipart body sent to a form action is a 400, not a 500", async () => {
    const res = await (await request())
      .post(`/proposals/${proposalId}/targets`)
      .set("Cookie", pi.cookie)
      .set("Content-Type", "multipart/form-data; boundary=----nope")
      .send("------nope\r\nContent-Disposition: form-data; name=\"intent\"\r\n\r\ncreate\r\n------nope\r\nContent-Dis");
    expect(res.status).toBe(400);
  });

  it("a broken multipart upload of a science case is a 400, not a 500", async () => {
    const res = await (await request())
      .post(`/proposals/${proposalId}/science-case`)
      .set("Cookie", pi.cookie)
      .set("Content-Type", "multipart/form-data; boundary=xyz")
      .send("--xyz\r\nContent-Disposition: form-data; name=\"file\"; filename=\"a.pdf\"\r\n\r\n%PDF-1.4 cut short");
    expect(res.status).toBe(400);
  });

  it("the server still answers afterwards", async () => {
    const res = await (await request()).get(`/proposals/${proposalId}/targets`).set("Cookie", pi.cookie);
    expect(res.status).toBe(200);
  });
});

describe("the science API's ids and zones", () => {
  it.each(["abc", "-1", "1.5", "Infinity"])("telescope=%j is a 400 JSON naming the field", async (id) => {
    const res = await (await request()).get(`/api/v1/visibility?telescope=${encodeURIComponent(id)}&ra=10:00:00&dec=+10:00:00&from=2027-02-01&nights=1`);
    expect(res.status).toBe(400);
    expect(res.body.issues.map((i: { path: string }) => i.path)).toContain("telescope");
  });

  it("a time zone of 10 000 characters is a 400, not a cache entry", async () => {
    const res = await (await request()).get(`/api/v1/visibility?lat=30&lon=-110&timeZone=${"A".repeat(10_000)}&ra=10:00:00&dec=+10:00:00&from=2027-02-01&nights=1`);
    expect(res.status).toBe(400);
    expect(res.body.issues.map((i: { path: string }) => i.path)).toContain("timeZone");
  });
});
