import supertest from "supertest";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { SignInRequest, User } from "~/models/index.server";
import { form, testApp } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { clearMail, codeFrom, linkFrom, waitForMail } from "../helpers/maildev";

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
    const bad = await a.post(res.headers.location).type("form").send(form({ name: "", institution: "Vennholm University" }));
    expect(bad.status).toBe(400);
    expect(bad.text).toContain("Enter your name");
    expect(bad.text).toContain('value="Vennholm University"');
    const ok = await a.post(res.headers.location).type("form").send(form({ name: "Ada Testing", institution: "Vennholm University" }));
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
    const totpCookie = (sent.headers["set-cookie"] as unknown as string[]).find((c: string) => c.startsWith("_totp="))!.split(";")[0];
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

  it("limits codes per client address across many e-mail addresses", async () => {
    const a = await agent();
    for (let i = 0; i < 20; i++) {
      const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: freshAddress() }));
      expect(res.status).toBe(302);
    }
    const res = await a.post("/sign-in").type("form").send(form({ intent: "send", email: freshAddress() }));
    expect(res.status).toBe(429);
    expect(res.text).toContain("Too many codes were asked for your network address");
  });

  it("signs out only by POST", async () => {
    const a = await agent();
    const code = await askForCode(a, "pi@kestrel-ridge.example");
    await typeCode(a, code);
    expect((await a.get("/sign-out")).headers.location).toBe("/");
    expect((await a.get("/")).text).toContain("Sign out");
    const out = await a.post("/sign-out");
    expect(out.status).toBe(302);
    expect((await a.get("/")).text).not.toContain("Sign out");
  });
});
