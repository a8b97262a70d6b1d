import supertest from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { sweep } from "~/lib/housekeeping.server";
import { sha256 } from "~/lib/auth/session.server";
import { AuditEntry, User, UserSession } from "~/models/index.server";
import { form, testApp } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";

const app = async () => supertest(await testApp());

/** 200 while the cookie is a live session, 401 once it is not (a JSON API route). */
async function status(cookie: string) {
  return (await (await app()).get("/api/v1/proposals").set("Cookie", cookie)).status;
}

/** The session row behind a cookie (the cookie holds only a random token; the row its sha256). */
function tokenOf(cookie: string) {
  const value = decodeURIComponent(cookie.slice(cookie.indexOf("=") + 1));
  const payload = JSON.parse(Buffer.from(value.slice(0, value.lastIndexOf(".")), "base64").toString("utf8"));
  return payload as Record<string, unknown>;
}
async function rowOf(cookie: string) {
  return UserSession.findOne({ where: { tokenHash: sha256(tokenOf(cookie).sid as string) } });
}

describe("server-side sessions", () => {
  let adminCookie: string;
  beforeAll(async () => {
    await ensureDatabase();
    adminCookie = await sessionCookieFor("admin@kestrel-ridge.example");
  });

  it("the cookie holds only a random session token; the database only its hash", async () => {
    const { cookie } = await newUser();
    const payload = tokenOf(cookie);
    expect(Object.keys(payload)).toEqual(["sid"]);
    expect(String(payload.sid)).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(await UserSession.count({ where: { tokenHash: payload.sid as string } })).toBe(0);
    expect(await rowOf(cookie)).not.toBeNull();
  });

  it("sign-out ends the session on the server: an old copy of the cookie is signed out", async () => {
    const { cookie } = await newUser();
    const other = await sessionCookieFor((await User.findOne({ where: { id: (await rowOf(cookie))!.userId } }))!.email);
    expect(await status(cookie)).toBe(200);
    const out = await (await app()).post("/sign-out").set("Cookie", cookie);
    expect(out.status).toBe(302);
    expect(await status(cookie)).toBe(401);
    expect(await rowOf(cookie)).toBeNull();
    // Only that browser: the same person's other session goes on.
    expect(await status(other)).toBe(200);
  });

  it("a role grant or revoke ends that person's sessions", async () => {
    const target = await newUser();
    expect(await status(target.cookie)).toBe(200);
    const grant = await (await app()).post("/api/v1/admin/users").set("Cookie", adminCookie).send({ intent: "grant", userId: target.user.id, role: "reviewer" });
    expect(grant.status).toBe(200);
    expect(await status(target.cookie)).toBe(401);
    const again = await sessionCookieFor(target.email);
    expect((await (await app()).get("/review").set("Cookie", again)).status).toBe(200);
    const revoke = await (await app()).post("/admin/users").set("Cookie", adminCookie).type("form").send(form({ intent: "revoke", userId: target.user.id, role: "reviewer" }));
    expect(revoke.status).toBe(200);
    expect(await status(again)).toBe(401);
    // The admin who made the changes is still signed in.
    expect(await status(adminCookie)).toBe(200);
  });

  it("an admin changing their own roles keeps the session they use", async () => {
    const admin = await newUser({ roles: ["admin"] });
    const elsewhere = await sessionCookieFor(admin.email);
    const res = await (await app()).post("/api/v1/admin/users").set("Cookie", admin.cookie).send({ intent: "grant", userId: admin.user.id, role: "chair" });
    expect(res.status).toBe(200);
    expect(await status(admin.cookie)).toBe(200);
    expect(await status(elsewhere)).toBe(401);
  });

  it('"Sign this person out everywhere" on /admin/users ends every session of that person, audited', async () => {
    const target = await newUser();
    const second = await sessionCookieFor(target.email);
    const page = await (await app()).get("/admin/users").set("Cookie", adminCookie);
    // (The table shows 20 accounts a page, so the target may be on a later one.)
    expect(page.text).toContain("Sign this person out everywhere");
    const res = await (await app()).post("/admin/users").set("Cookie", adminCookie).type("form").send(form({ intent: "sign-out-everywhere", userId: target.user.id }));
    expect(res.status).toBe(200);
    expect(await status(target.cookie)).toBe(401);
    expect(await status(second)).toBe(401);
    const audit = await AuditEntry.findOne({ where: { action: "user.signed_out_everywhere", entityId: target.user.id } });
    expect(audit?.details).toMatchObject({ email: target.email, sessionsEnded: 2 });
  });

  it("the same through the API route; refused to anyone but an admin", async () => {
    const target = await newUser();
    const reviewer = await newUser({ roles: ["reviewer"] });
    const refused = await (await app()).post("/api/v1/admin/users").set("Cookie", reviewer.cookie).send({ intent: "sign-out-everywhere", userId: target.user.id });
    expect(refused.status).toBe(403);
    expect(await status(target.cookie)).toBe(200);
    const bad = await (await app()).post("/api/v1/admin/users").set("Cookie", adminCookie).send({ intent: "sign-out-everywhere", userId: "x" });
    expect(bad.status).toBe(400);
    expect(bad.body.issues.map((i: { path: string }) => i.path)).toEqual(["userId"]);
    const res = await (await app()).post("/api/v1/admin/users").set("Cookie", adminCookie).send({ intent: "sign-out-everywhere", userId: target.user.id });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ email: target.email, sessionsEnded: 1 });
    expect(await status(target.cookie)).toBe(401);
  });

  it("expires after 12 hours without activity, and 14 days after sign-in whatever the activity", async () => {
    const idle = await newUser();
    await UserSession.update({ lastSeenAt: new Date(Date.now() - 12 * 3600_000 - 60_000) }, { where: { id: (await rowOf(idle.cookie))!.id } });
    expect(await status(idle.cookie)).toBe(401);
    expect(await rowOf(idle.cookie)).toBeNull();

    const recent = await newUser();
    await UserSession.update({ lastSeenAt: new Date(Date.now() - 11 * 3600_000) }, { where: { id: (await rowOf(recent.cookie))!.id } });
    expect(await status(recent.cookie)).toBe(200);

    const old = await newUser();
    await UserSession.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: (await rowOf(old.cookie))!.id } });
    expect(await status(old.cookie)).toBe(401);
  });

  it("the housekeeping sweep removes sessions nobody will present again, and keeps live ones", async () => {
    const abandoned = await newUser();
    const live = await newUser();
    const abandonedId = (await rowOf(abandoned.cookie))!.id;
    await UserSession.update({ lastSeenAt: new Date(Date.now() - 13 * 3600_000) }, { where: { id: abandonedId } });
    const swept = await sweep();
    expect(swept.sessions).toBeGreaterThanOrEqual(1);
    expect(await UserSession.findByPk(abandonedId)).toBeNull();
    expect(await rowOf(live.cookie)).not.toBeNull();
    expect(await status(live.cookie)).toBe(200);
  });

  it("notes activity at most once a minute, not on every request", async () => {
    const { cookie } = await newUser();
    const row = (await rowOf(cookie))!;
    const thirtySecondsAgo = new Date(Date.now() - 30_000);
    await UserSession.update({ lastSeenAt: thirtySecondsAgo }, { where: { id: row.id } });
    expect(await status(cookie)).toBe(200);
    expect((await rowOf(cookie))!.lastSeenAt.getTime()).toBe(thirtySecondsAgo.getTime());
    const fiveMinutesAgo = new Date(Date.now() - 5 * 60_000);
    await UserSession.update({ lastSeenAt: fiveMinutesAgo }, { where: { id: row.id } });
    expect(await status(cookie)).toBe(200);
    expect((await rowOf(cookie))!.lastSeenAt.getTime()).toBeGreaterThan(fiveMinutesAgo.getTime() + 4 * 60_000);
  });
});
