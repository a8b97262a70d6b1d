// Science-case upload through HTTP: content checks (not the name), page limit, history, access.
import { PDFDocument, PDFName } from "pdf-lib";
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, StoredFile } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { pdfWithPages, readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let pi: Person;
let stranger: Person;
let proposalId: number;
let otherProposalId: number;

async function upload(id: number, cookie: string, bytes: Uint8Array | Buffer, filename = "science-case.pdf", contentType = "application/pdf") {
  return (await request())
    .post(`/proposals/${id}/science-case`)
    .set("Cookie", cookie)
    .field("intent", "upload")
    .attach("file", Buffer.from(bytes), { filename, contentType });
}

const files = (id: number) => StoredFile.count({ where: { proposalId: id, kind: "science_case" } });

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Case PI" });
  stranger = await newUser({ name: "Case Stranger" });
  const call = await testCall();
  proposalId = (await readyProposal({ user: pi.user, callId: call.id, title: "Science-case test programme" })).proposal.id;
  otherProposalId = (await readyProposal({ user: stranger.user, callId: call.id, title: "The stranger's own programme" })).proposal.id;
});

describe("science case upload", () => {
  it("refuses a file that is not a PDF even when it is called .pdf", async () => {
    const before = await files(proposalId);
    const res = await upload(proposalId, pi.cookie, Buffer.from("Dear committee,\nthis is plain text.\n"), "case.pdf");
    expect(res.status).toBe(400);
    expect(res.text).toContain("This file is not a PDF");
    expect(await files(proposalId)).toBe(before);
  });

  it("refuses a corrupt PDF", async () => {
    const good = Buffer.from(await pdfWithPages(2));
    const corrupt = Buffer.concat([good.subarray(0, 40), Buffer.from("\u0000\u0001 broken objects 12 0 obj << /Type /Pages /Kids [ 99 0 R "), good.subarray(good.length - 30)]);
    const res = await upload(proposalId, pi.cookie, corrupt);
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/cannot be read|page tree cannot be read|has no pages/);
  });

  it("refuses an encrypted PDF", async () => {
    const doc = await PDFDocument.load(await pdfWithPages(1));
    doc.context.trailerInfo.Encrypt = doc.context.obj({ Filter: PDFName.of("Standard"), V: 1, R: 2 });
    const res = await upload(proposalId, pi.cookie, await doc.save());
    expect(res.status).toBe(400);
    expect(res.text).toContain("encrypted");
  });

  it("refuses more pages than the call allows, with the count", async () => {
    const res = await upload(proposalId, pi.cookie, await pdfWithPages(6));
    expect(res.status).toBe(400);
    expect(res.text).toContain("The science case has 6 pages; this call allows 4.");
  });

  it("refuses a file over the size limit before reading it whole", async () => {
    const res = await upload(proposalId, pi.cookie, Buffer.alloc(11 * 1024 * 1024, 0x25));
    expect(res.status).toBe(400);
    expect(res.text).toContain("larger than 10 MB");
  });

  it("keeps earlier versions when the science case is replaced, and audits each upload", async () => {
    const before = await files(proposalId);
    const res = await upload(proposalId, pi.cookie, await pdfWithPages(3), "case-v2.pdf");
    expect(res.status).toBe(200);
    expect(await files(proposalId)).toBe(before + 1);
    const newest = await StoredFile.findOne({ where: { proposalId, kind: "science_case" }, order: [["id", "DESC"]] });
    expect(newest).toMatchObject({ filename: "case-v2.pdf", pageCount: 3, contentType: "application/pdf" });
    expect(newest!.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(await AuditEntry.count({ where: { proposalId, action: "science_case.replaced", entityId: newest!.id } })).toBe(1);
    const page = await (await request()).get(`/proposals/${proposalId}/science-case`).set("Cookie", pi.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("case-v2.pdf");
    expect(page.text).toContain("case.pdf"); // the earlier version, in the history
  });

  it("serves the files to the team only", async () => {
    const file = await StoredFile.findOne({ where: { proposalId, kind: "science_case" }, order: [["id", "DESC"]] });
    const mine = await (await request()).get(`/proposals/${proposalId}/files/${file!.id}`).set("Cookie", pi.cookie).buffer(true);
    expect(mine.status).toBe(200);
    expect(mine.headers["content-type"]).toBe("application/pdf");
    expect(Buffer.compare(Buffer.from(mine.body), file!.data)).toBe(0);
    const theirs = await (await request()).get(`/proposals/${proposalId}/files/${file!.id}`).set("Cookie", stranger.cookie);
    expect(theirs.status).toBe(404);
    // another proposal's file under my proposal's address
    const other = await StoredFile.findOne({ where: { proposalId: otherProposalId } });
    const crossed = await (await request()).get(`/proposals/${proposalId}/files/${other!.id}`).set("Cookie", pi.cookie);
    expect(crossed.status).toBe(404);
    const anonymous = await (await request()).get(`/proposals/${proposalId}/files/${file!.id}`);
    expect(anonymous.status).toBe(302);
    expect(anonymous.headers.location).toMatch(/^\/sign-in/);
  });

  it("answers 404 to other users for the page and the upload", async () => {
    const page = await (await request()).get(`/proposals/${proposalId}/science-case`).set("Cookie", stranger.cookie);
    expect(page.status).toBe(404);
    const before = await files(proposalId);
    const res = await upload(proposalId, stranger.cookie, await pdfWithPages(1));
    expect(res.status).toBe(404);
    expect(await files(proposalId)).toBe(before);
  });
});
