import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, RoleGrant, User } from "~/models/index.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";

const people = ["anonymous", "pi", "reviewer", "chair", "admin"] as const;
type Person = (typeof people)[number];
const cookies: Record<Person, string> = { anonymous: "", pi: "", reviewer: "", chair: "", admin: "" };

// Who may use what: every role is checked on the server, none implies another.
const pages: { path: string; allowed: Person[] }[] = [
  { path: "/review", allowed: ["reviewer"] },
  { path: "/committee", allowed: ["chair"] },
  { path: "/admin", allowed: ["admin"] },
  { path: "/admin/users", allowed: ["admin"] },
];

describe("the role matrix", () => {
  beforeAll(async () => {
    await ensureDatabase();
    for (const person of people.slice(1)) cookies[person] = await sessionCookieFor(`${person}@kestrel-ridge.example`);
  });

  for (const { path, allowed } of pages) {
    for (const person of people) {
      const expected = allowed.includes(person) ? 200 : person === "anonymous" ? 302 : 403;
      it(`${person} → GET ${path} answers ${expected}`, async () => {
        const res = await (await request()).get(path).set("Cookie", cookies[person]);
        expect(res.status).toBe(expected);
        if (expected === 302) expect(res.headers.location).toBe(`/sign-in?redirectTo=${encodeURIComponent(path)}`);
        if (expected === 403) expect(res.text).toContain("Not for your account");
      });
    }
  }

  for (const person of people) {
    const allowed = person === "admin";
    it(`${person} → POST /admin/users (grant) is ${allowed ? "allowed" : "refused"}`, async () => {
      const target = await newUser();
      const res = await (await request())
        .post("/admin/users")
        .set("Cookie", cookies[person])
        .type("form")
        .send(form({ intent: "grant", userId: target.user.id, role: "reviewer" }));
      expect(res.status).toBe(allowed ? 200 : person === "anonymous" ? 302 : 403);
      expect(await RoleGrant.count({ where: { userId: target.user.id } })).toBe(allowed ? 1 : 0);
    });

    const apiStatus = allowed ? 200 : person === "anonymous" ? 401 : 403;
    it(`${person} → GET /api/v1/admin/users answers ${apiStatus} JSON`, async () => {
      const res = await (await request()).get("/api/v1/admin/users").set("Cookie", cookies[person]);
      expect(res.status).toBe(apiStatus);
      expect(res.headers["content-type"]).toMatch(/application\/json/);
      if (allowed) expect(res.body.users.length).toBeGreaterThan(3);
      else expect(res.body.error).toBeTruthy();
    });

    it(`${person} → POST /api/v1/admin/users answers ${apiStatus} JSON`, async () => {
      const target = await newUser();
      const res = await (await request())
        .post("/api/v1/admin/users")
        .set("Cookie", cookies[person])
        .send({ intent: "grant", userId: target.user.id, role: "chair" });
      expect(res.status).toBe(apiStatus);
      expect(await RoleGrant.count({ where: { userId: target.user.id } })).toBe(allowed ? 1 : 0);
    });
  }

  it("an admin grants and revokes roles, each change audited, none implying another", async () => {
    const target = await newUser();
    const agent = await request();
    for (const role of ["reviewer", "chair"]) {
      const res = await agent.post("/admin/users").set("Cookie", cookies.admin).type("form").send(form({ intent: "grant", userId: target.user.id, role }));
      expect(res.status).toBe(200);
    }
    const roles = (await RoleGrant.findAll({ where: { userId: target.user.id } })).map((g) => g.role).sort();
    expect(roles).toEqual(["chair", "reviewer"]);
    // A role change ends the person's sessions: they sign in again (a fresh cookie) with the new roles.
    expect((await agent.get("/admin").set("Cookie", await sessionCookieFor(target.email))).status).toBe(403);
    await agent.post("/admin/users").set("Cookie", cookies.admin).type("form").send(form({ intent: "revoke", userId: target.user.id, role: "chair" }));
    const afterRevoke = await sessionCookieFor(target.email);
    expect((await agent.get("/committee").set("Cookie", afterRevoke)).status).toBe(403);
    expect((await agent.get("/review").set("Cookie", afterRevoke)).status).toBe(200);
    const audit = await AuditEntry.findAll({ where: { entityType: "user", entityId: target.user.id }, order: [["id", "ASC"]] });
    expect(audit.map((a) => `${a.action}:${(a.details as { role: string }).role}`)).toEqual([
      "role.grant:reviewer",
      "role.grant:chair",
      "role.revoke:chair",
    ]);
  });

  it("refuses bad role changes with a 400 naming the field", async () => {
    const agent = await request();
    const res = await agent.post("/api/v1/admin/users").set("Cookie", cookies.admin).send({ intent: "grant", userId: "x", role: "emperor" });
    expect(res.status).toBe(400);
    expect(res.body.issues.map((i: { path: string }) => i.path).sort()).toEqual(["role", "userId"]);
    const page = await agent.post("/admin/users").set("Cookie", cookies.admin).type("form").send(form({ intent: "grant", userId: 1, role: "emperor" }));
    expect(page.status).toBe(400);
  });

  it("an admin cannot revoke their own admin role", async () => {
    const admin = await User.findOne({ where: { email: "admin@kestrel-ridge.example" } });
    const res = await (await request()).post("/api/v1/admin/users").set("Cookie", cookies.admin).send({ intent: "revoke", userId: admin!.id, role: "admin" });
    expect(res.status).toBe(400);
    expect(await RoleGrant.count({ where: { userId: admin!.id, role: "admin" } })).toBe(1);
  });

  it("answers unknown pages with our 404", async () => {
    const res = await (await request()).get("/no/such/page");
    expect(res.status).toBe(404);
    expect(res.text).toContain("Nothing here");
  });
});
