import supertest from "supertest";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { Op } from "sequelize";
import { CODE_ALPHABET } from "~/lib/schemas/auth";
import { AuditEntry, OutgoingMail, SignInCode, SignInRequest, User, UserSession } from "~/models/index.server";
import { form, testApp } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { allMail, clearMail, codeFrom, linkFrom, waitForMail, type CaughtMail } from "../helpers/maildev";

let counter = 0;
const freshAddress = () => `signin-${Date.now()}-${++counter}@test.example`;

async function agent() {
  return supertest.agent(await testApp());
}

async function askForCode(a: supertest.Agent, email: string) {
  const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email }));
  expect(res.status, res.text.slice(0, 300)).toBe(302);
  expect(res.headers.location).toBe("/sign-in");
  return codeFrom(await waitForMail(email, /sign-in code/));
}

async function typeCode(a: supertest.Agent, code: string) {
  return a.post("/sign-in").type("form").send(form({ intent: "verify", code }));
}

/** The `name=value` pairs a response sets, as a Cookie header. */
function cookiesOf(res: supertest.Response, only?: string) {
  return ((res.headers["set-cookie"] as unknown as string[] | undefined) ?? [])
    .map((c) => c.split(";")[0])
    .filter((c) => (only ? c.startsWith(`${only}=`) : !c.endsWith("=")))
    .join("; ");
}

/** The first sign-in mail to `email` that was not in the catcher before (`before`: their ids). */
async function newMail(email: string, before: Set<string>): Promise<CaughtMail> {
  for (let i = 0; i < 100; i++) {
    const mail = (await allMail()).find((m) => !before.has(m.id) && m.to.some((t) => t.address === email) && /sign-in code/.test(m.subject));
    if (mail) return mail;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`No new sign-in mail to ${email}`);
}

const plain = async () => supertest(await testApp());

/** Asks for a code without a cookie jar: answers the session cookie and the mailed code. */
async function codeForBrowser(email: string) {
  const sent = await (await plain()).post("/sign-in").type("form").send(form({ intent: "send", email }));
  expect(sent.status, sent.text.slice(0, 300)).toBe(302);
  return { cookie: cookiesOf(sent, "__nightshare"), code: codeFrom(await waitForMail(email, /sign-in code/)) };
}

async function signedInAs(cookie: string) {
  const res = await (await plain()).get("/api/v1/admin/users").set("Cookie", cookie);
  return res.status;
}

describe("sign-in by e-mailed code", () => {
  beforeAll(async () => {
    await ensureDatabase();
    await clearMail();
  });
  beforeEach(async () => {
    await SignInRequest.destroy({ where: {} });
  });
  afterEach(() => {
    vi.useRealTimers();
  });
  afterAll(async () => {
    // Leave no rate-limit state for the test files that sign in after this one.
    await SignInRequest.destroy({ where: {} });
  });

  it("signs in a demo user with the code from the mail catcher", async () => {
    const a = await agent();
    const code = await askForCode(a, "reviewer@kestrel-ridge.example");
    const page = await a.get("/sign-in");
    expect(page.text).toContain("We sent a code to");
    const res = await typeCode(a, code);
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe("/");
    const home = await a.get("/review");
    expect(home.status).toBe(200);
    expect(home.text).toContain("Review");
  });

  it("signs in through the one-click link", async () => {
    const a = await agent();
    await askForCode(a, "chair@kestrel-ridge.example");
    const link = new URL(linkFrom(await waitForMail("chair@kestrel-ridge.example", /sign-in code/)));
    const res = await a.get(link.pathname + link.search);
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe("/");
    expect((await a.get("/committee")).status).toBe(200);
  });

  it("creates an account for a new address and asks for name and institution once", async () => {
    const a = await agent();
    const email = freshAddress();
    const code = await askForCode(a, email);
    const res = await typeCode(a, code);
    expect(res.headers.location).toMatch(/^\/welcome/);
    const bad = await a.post(res.headers.location).type("form").send(form({ intent: "save", name: "", institution: "Vennholm University" }));
    expect(bad.status).toBe(400);
    expect(bad.text).toContain("Enter your name");
    expect(bad.text).toContain('value="Vennholm University"');
    const ok = await a.post(res.headers.location).type("form").send(form({ intent: "save", name: "Ada Testing", institution: "Vennholm University" }));
    expect(ok.status).toBe(302);
    const user = await User.findOne({ where: { email } });
    expect(user?.name).toBe("Ada Testing");
  });

  it("returns to the page that asked for sign-in", async () => {
    const a = await agent();
    const guarded = await a.get("/admin/users");
    expect(guarded.status).toBe(302);
    expect(guarded.headers.location).toBe("/sign-in?redirectTo=%2Fadmin%2Fusers");
    await a.get(guarded.headers.location);
    const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: "admin@kestrel-ridge.example", redirectTo: "/admin/users" }));
    expect(res.status).toBe(302);
    const code = codeFrom(await waitForMail("admin@kestrel-ridge.example", /sign-in code/));
    const done = await typeCode(a, code);
    expect(done.headers.location).toBe("/admin/users");
  });

  it("refuses an invalid address at the field and keeps what was typed", async () => {
    const a = await agent();
    const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: "not-an-address" }));
    expect(res.status).toBe(400);
    expect(res.text).toContain("Enter a valid e-mail address");
    expect(res.text).toContain('value="not-an-address"');
  });

  it("refuses a wrong code with a message and a way to ask for a new one", async () => {
    const a = await agent();
    const email = freshAddress();
    const code = await askForCode(a, email);
    const wrong = code === "AAAAAA" ? "BBBBBB" : "AAAAAA";
    const res = await typeCode(a, wrong);
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe("/sign-in");
    const page = await a.get("/sign-in");
    expect(page.text).toContain("That code is not right");
    expect(page.text).toContain("Send a new code");
    // The right code still works after one mistake.
    expect((await typeCode(a, code)).headers.location).toMatch(/^\/welcome/);
  });

  it("locks a code after three wrong attempts", async () => {
    const a = await agent();
    const email = freshAddress();
    const code = await askForCode(a, email);
    for (let i = 0; i < 3; i++) await typeCode(a, "ZZZZZ9");
    const res = await typeCode(a, code);
    expect(res.headers.location).toBe("/sign-in");
    expect((await a.get("/sign-in")).text).toContain("Too many wrong codes");
    expect(await User.findOne({ where: { email } })).toBeNull();
  });

  it("uses a code once only, even replayed from a copied cookie", async () => {
    const a = await agent();
    const email = freshAddress();
    const sent = await a.post("/sign-in").type("form").send(form({ intent: "send", email }));
    const totpCookie = cookiesOf(sent, "__nightshare");
    expect(totpCookie).not.toBe("");
    const code = codeFrom(await waitForMail(email, /sign-in code/));
    expect((await typeCode(a, code)).headers.location).toMatch(/^\/welcome/);
    const replay = await (await supertest(await testApp()))
      .post("/sign-in")
      .set("Cookie", totpCookie)
      .type("form")
      .send(form({ intent: "verify", code }));
    expect(replay.headers.location).toBe("/sign-in");
    // Whatever cookie the replay got back, it is not a signed-in session.
    const cookie = ((replay.headers["set-cookie"] as unknown as string[] | undefined) ?? []).map((c) => c.split(";")[0]).join("; ");
    const home = await (await supertest(await testApp())).get("/").set("Cookie", cookie);
    expect(home.text).not.toContain("Sign out");
    expect(await (await supertest(await testApp())).get("/sign-in").set("Cookie", cookie).then((r) => r.text)).toContain("already been used");
  });

  it("refuses an expired code", async () => {
    const a = await agent();
    const email = freshAddress();
    const code = await askForCode(a, email);
    vi.useFakeTimers({ toFake: ["Date"], now: Date.now() + 6 * 60_000 });
    const res = await typeCode(a, code);
    expect(res.headers.location).toBe("/sign-in");
    vi.useRealTimers();
    expect((await a.get("/sign-in")).text).toContain("That code has expired");
  });

  it("limits codes per address and says when to try again", async () => {
    const a = await agent();
    const email = freshAddress();
    for (let i = 0; i < 5; i++) {
      const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email }));
      expect(res.status).toBe(302);
    }
    const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email }));
    expect(res.status).toBe(429);
    expect(res.text).toMatch(/Too many codes were asked for this address\. Try again in 1[45] minutes/);
    expect(res.text).toContain(`value="${email}"`);
  });

  it("limits codes per client address, sized for an institute behind one address", async () => {
    const a = await agent();
    const first = await a.post("/sign-in").type("form").send(form({ intent: "send", email: freshAddress() }));
    expect(first.status).toBe(302);
    // 30 colleagues behind the same NAT address ask for codes: none is refused.
    for (let i = 0; i < 30; i++) {
      const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: freshAddress() }));
      expect(res.status).toBe(302);
    }
    // Fill the address's window up to its limit of 200, then the next is refused.
    const ip = (await SignInRequest.findOne({ order: [["id", "DESC"]] }))!.ip;
    const count = await SignInRequest.count({ where: { ip } });
    await SignInRequest.bulkCreate(Array.from({ length: 200 - count }, (_, i) => ({ email: `nat-${i}@test.example`, ip })));
    const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: freshAddress() }));
    expect(res.status).toBe(429);
    expect(res.text).toContain("Too many codes were asked for your network address");
  });

  it("signs out only by POST, and the old cookie stops working", async () => {
    const a = await agent();
    const code = await askForCode(a, "pi@kestrel-ridge.example");
    const signedIn = await typeCode(a, code);
    const oldCookie = cookiesOf(signedIn, "__nightshare");
    expect((await (await plain()).get("/api/v1/proposals").set("Cookie", oldCookie)).status).toBe(200);
    expect((await a.get("/sign-out")).headers.location).toBe("/");
    expect((await a.get("/")).text).toContain("Sign out");
    const out = await a.post("/sign-out");
    expect(out.status).toBe(302);
    expect((await a.get("/")).text).not.toContain("Sign out");
    // A copy of the cookie taken before signing out is signed out too.
    expect((await (await plain()).get("/api/v1/proposals").set("Cookie", oldCookie)).status).toBe(401);
  });

  it("accepts the code in any case; codes have no look-alike characters", async () => {
    const a = await agent();
    const email = freshAddress();
    const code = await askForCode(a, email);
    expect(code).toMatch(new RegExp(`^[${CODE_ALPHABET}]{6}$`));
    const res = await typeCode(a, code.toLowerCase());
    expect(res.headers.location).toMatch(/^\/welcome/);
  });

  it("returns only to same-origin paths after signing in", async () => {
    for (const evil of ["/\\evil.example", "/\t/evil.example", "//evil.example", "https://evil.example/x"]) {
      await SignInRequest.destroy({ where: {} });
      const a = await agent();
      const before = new Set((await allMail()).map((m) => m.id));
      const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: "reviewer@kestrel-ridge.example", redirectTo: evil }));
      expect(res.status).toBe(302);
      const done = await typeCode(a, codeFrom(await newMail("reviewer@kestrel-ridge.example", before)));
      expect(done.headers.location, evil).toBe("/");
      // Signed in, the sign-in page itself also refuses to send the visitor away.
      expect((await a.get(`/sign-in?redirectTo=${encodeURIComponent(evil)}`)).headers.location, evil).toBe("/");
    }
  });
});

describe("the account signed in is the one the code was mailed to", () => {
  beforeAll(async () => {
    await ensureDatabase();
  });
  beforeEach(async () => {
    await SignInRequest.destroy({ where: {} });
  });

  it("refuses a code whose _totp cookie was edited to another address: no session, audited", async () => {
    const attacker = freshAddress();
    const victim = "admin@kestrel-ridge.example";
    const victimUser = (await User.findOne({ where: { email: victim } }))!;
    const startedAt = new Date();
    const { cookie, code } = await codeForBrowser(attacker);
    // The old attack: remix-auth-totp's unsigned cookie with the victim's address.
    const forged = `_totp=${new URLSearchParams({ email: victim, totp: JSON.stringify({ jwe: "x", attempts: 0 }) })}`;
    const page = await (await plain()).get("/sign-in").set("Cookie", `${cookie}; ${forged}`);
    expect(page.text).toContain(attacker);
    expect(page.text).not.toContain(victim);
    const res = await (await plain()).post("/sign-in").set("Cookie", `${cookie}; ${forged}`).type("form").send(form({ intent: "verify", code }));
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe("/sign-in");
    const after = cookiesOf(res, "__nightshare");
    expect(await signedInAs(after)).toBe(401);
    expect(await UserSession.count({ where: { userId: victimUser.id, createdAt: { [Op.gte]: startedAt } } })).toBe(0);
    const audit = await AuditEntry.findOne({ where: { action: "sign_in.address_mismatch", createdAt: { [Op.gte]: startedAt } }, order: [["id", "DESC"]] });
    expect(audit?.details).toMatchObject({ issuedFor: attacker, claimed: victim });
    expect((await (await plain()).get("/sign-in").set("Cookie", after)).text).toContain("not issued for that address");
    // The code is spent: not even the attacker's own address signs in with it now.
    const again = await (await plain()).post("/sign-in").set("Cookie", cookie).type("form").send(form({ intent: "verify", code }));
    expect(again.headers.location).toBe("/sign-in");
    expect(await User.findOne({ where: { email: attacker } })).toBeNull();
  });

  it("refuses a session cookie that was edited (its signature no longer matches)", async () => {
    const { cookie, code } = await codeForBrowser(freshAddress());
    const [name, value] = cookie.split("=");
    const tampered = `${name}=${value.slice(0, 10)}${value[10] === "A" ? "B" : "A"}${value.slice(11)}`;
    const res = await (await plain()).post("/sign-in").set("Cookie", tampered).type("form").send(form({ intent: "verify", code }));
    expect(res.headers.location).toBe("/sign-in");
    expect(await signedInAs(cookiesOf(res, "__nightshare"))).toBe(401);
  });

  it("never sends the library's _totp cookie (with its address) to the browser", async () => {
    const sent = await (await plain()).post("/sign-in").type("form").send(form({ intent: "send", email: freshAddress() }));
    const totp = ((sent.headers["set-cookie"] as unknown as string[]) ?? []).filter((c) => c.startsWith("_totp="));
    for (const c of totp) expect(c).toMatch(/^_totp=;/);
  });

  it("a normal sign-in signs in exactly the address the code was mailed to", async () => {
    const email = freshAddress();
    const { cookie, code } = await codeForBrowser(email);
    const res = await (await plain()).post("/sign-in").set("Cookie", cookie).type("form").send(form({ intent: "verify", code }));
    expect(res.headers.location).toMatch(/^\/welcome/);
    const user = await User.findOne({ where: { email } });
    expect(await UserSession.count({ where: { userId: user!.id } })).toBe(1);
  });
});

describe("sign-in limits hold under a parallel burst", () => {
  beforeAll(async () => {
    await ensureDatabase();
  });
  beforeEach(async () => {
    await SignInRequest.destroy({ where: {} });
  });

  it("60 parallel code requests for one address mail at most 5 codes", async () => {
    const email = freshAddress();
    const app = await testApp();
    const results = await Promise.all(
      Array.from({ length: 60 }, () => supertest(app).post("/sign-in").type("form").send(form({ intent: "send", email }))),
    );
    const statuses = results.map((r) => r.status);
    expect(statuses.filter((s) => s === 302)).toHaveLength(5);
    expect(statuses.filter((s) => s === 429)).toHaveLength(55);
    expect(await OutgoingMail.count({ where: { toAddress: email } })).toBe(5);
    expect(await SignInCode.count({ where: { email } })).toBe(5);
  });

  it("parallel wrong codes: at most 3 are checked, then the right code is refused too", async () => {
    const email = freshAddress();
    const { cookie, code } = await codeForBrowser(email);
    const wrong = code === "AAAAAA" ? "BBBBBB" : "AAAAAA";
    const app = await testApp();
    const results = await Promise.all(
      Array.from({ length: 30 }, () => supertest(app).post("/sign-in").set("Cookie", cookie).type("form").send(form({ intent: "verify", code: wrong }))),
    );
    const messages = await Promise.all(
      results.map(async (r) => {
        expect(r.headers.location).toBe("/sign-in");
        return (await supertest(app).get("/sign-in").set("Cookie", cookiesOf(r, "__nightshare"))).text;
      }),
    );
    expect(messages.filter((t) => t.includes("That code is not right"))).toHaveLength(3);
    expect(messages.filter((t) => t.includes("Too many wrong codes"))).toHaveLength(27);
    const right = await supertest(app).post("/sign-in").set("Cookie", cookie).type("form").send(form({ intent: "verify", code }));
    expect(right.headers.location).toBe("/sign-in");
    expect(await User.findOne({ where: { email } })).toBeNull();
    expect((await SignInCode.findOne({ where: { email } }))?.attempts).toBe(3);
  });
});
