// Issue 7, item 12: science cases with active content (scripts, launch actions, embedded files,
// javascript: links) are refused with a message that says why; a plain PDF is still accepted;
// stored files are served as attachments in a sandbox.
import { PDFDocument, PDFHexString, PDFName, PDFString } from "pdf-lib";
import { beforeAll, describe, expect, it } from "vitest";
import { StoredFile } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { pdfWithPages, readyProposal, testCall } from "./proposals-fixtures";

let cookie: string;
let proposalId: number;

async function upload(bytes: Uint8Array) {
  return (await request()).post(`/proposals/${proposalId}/science-case`).set("Cookie", cookie).field("intent", "upload").attach("file", Buffer.from(bytes), { filename: "case.pdf", contentType: "application/pdf" });
}

const count = () => StoredFile.count({ where: { proposalId, kind: "science_case" } });

async function base() {
  return PDFDocument.load(await pdfWithPages(1));
}

/** A link annotation on page 1 carrying the given action dictionary. */
function withLinkAction(doc: PDFDocument, action: Record<string, unknown>) {
  const ctx = doc.context;
  const annot = ctx.register(ctx.obj({ Type: "Annot", Subtype: "Link", Rect: [0, 0, 100, 100], A: ctx.obj(action as never) }));
  doc.getPage(0).node.set(PDFName.of("Annots"), ctx.obj([annot]));
  return doc;
}

const cases: [string, () => Promise<Uint8Array>, RegExp][] = [
  [
    "a JavaScript open action",
    async () => {
      const doc = await base();
      doc.catalog.set(PDFName.of("OpenAction"), doc.context.obj({ S: "JavaScript", JS: PDFString.of("app.alert('hi')") }));
      return doc.save();
    },
    /contains JavaScript/,
  ],
  [
    "a document-level JavaScript name tree (in an object stream)",
    async () => {
      const doc = await base();
      const ctx = doc.context;
      const js = ctx.register(ctx.obj({ S: "JavaScript", JS: PDFHexString.fromText("this.print()") }));
      doc.catalog.set(PDFName.of("Names"), ctx.obj({ JavaScript: ctx.obj({ Names: [PDFString.of("start"), js] }) }));
      return doc.save({ useObjectStreams: true });
    },
    /contains JavaScript/,
  ],
  [
    "a link whose URI is javascript:",
    async () => withLinkAction(await base(), { S: "URI", URI: PDFString.of(" JavaScript:alert(document.cookie)") }).save(),
    /contains a javascript: link/,
  ],
  [
    "a launch action",
    async () => withLinkAction(await base(), { S: "Launch", F: PDFString.of("calc.exe") }).save(),
    /contains a launch action/,
  ],
  [
    "an embedded file",
    async () => {
      const doc = await base();
      await doc.attach(Buffer.from("not for the committee"), "notes.txt", { mimeType: "text/plain" });
      return doc.save();
    },
    /contains an embedded file/,
  ],
];

beforeAll(async () => {
  await ensureDatabase();
  const pi = await newUser({ name: "Active Content PI" });
  cookie = pi.cookie;
  const call = await testCall();
  proposalId = (await readyProposal({ user: pi.user, callId: call.id, title: "Active content test programme" })).proposal.id;
});

describe("science case with active content", () => {
  it.each(cases)("refuses %s and says why", async (_what, build, message) => {
    const before = await count();
    const res = await upload(await build());
    expect(res.status).toBe(400);
    expect(res.text).toMatch(message);
    expect(res.text).toContain("plain PDF");
    expect(await count()).toBe(before);
  });

  it("names every kind found in one message", async () => {
    const doc = withLinkAction(await base(), { S: "Launch", F: PDFString.of("x.exe") });
    doc.catalog.set(PDFName.of("OpenAction"), doc.context.obj({ S: "JavaScript", JS: PDFString.of("1") }));
    const res = await upload(await doc.save());
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/contains (JavaScript and a launch action|a launch action and JavaScript)/);
  });

  it("still accepts a plain PDF with an ordinary web link", async () => {
    const before = await count();
    const res = await upload(await withLinkAction(await base(), { S: "URI", URI: PDFString.of("https://example.org/paper") }).save());
    expect(res.status).toBe(200);
    expect(await count()).toBe(before + 1);
  });

  it("serves a stored file as an attachment, unsniffed and sandboxed, also when shown inline", async () => {
    const file = await StoredFile.findOne({ where: { proposalId, kind: "science_case" }, order: [["id", "DESC"]] });
    const download = await (await request()).get(`/proposals/${proposalId}/files/${file!.id}`).set("Cookie", cookie);
    expect(download.status).toBe(200);
    expect(download.headers["content-disposition"]).toMatch(/^attachment;/);
    expect(download.headers["x-content-type-options"]).toBe("nosniff");
    const inline = await (await request()).get(`/proposals/${proposalId}/files/${file!.id}?inline=1`).set("Cookie", cookie);
    expect(inline.status).toBe(200);
    expect(inline.headers["content-disposition"]).toMatch(/^inline;/);
    expect(inline.headers["content-security-policy"]).toMatch(/(^|;\s*)sandbox(;|$)/);
    expect(inline.headers["x-content-type-options"]).toBe("nosniff");
  });

  it("answers 404, not 500, for a file id that is not a number", async () => {
    const res = await (await request()).get(`/proposals/${proposalId}/files/abc`).set("Cookie", cookie);
    expect(res.status).toBe(404);
  });
});
