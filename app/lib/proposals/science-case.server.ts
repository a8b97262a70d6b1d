// The science case: a PDF the team uploads, checked by its content (never by its name or the
// browser's content type), counted with pdf-lib against the call's page limit, and kept: every
// upload is a new stored_files row, so earlier versions stay in the history.
import { createHash } from "node:crypto";
import { PDFArray, PDFDict, PDFDocument, PDFHexString, PDFName, PDFStream, PDFString, type PDFObject } from "pdf-lib";
import { writeAudit } from "~/lib/audit.server";
import { readForm, Refusal } from "~/lib/forms";
import { assertEditable, getProposalForUser, type Actor } from "~/lib/proposals/proposals.server";
import { sequelize, StoredFile, User } from "~/models/index.server";

import { SCIENCE_CASE_KIND, SCIENCE_CASE_MAX_BYTES } from "~/lib/proposals/science-case";

export { SCIENCE_CASE_KIND, SCIENCE_CASE_MAX_BYTES };

export type ScienceCaseInfo = { id: number; filename: string; pageCount: number; sizeBytes: number; createdAt: string; sha256: string; uploadedBy: string | null };

const refuse = (message: string) => new Refusal(message, { status: 400, field: "file" });

function megabytes(n: number) {
  return `${(n / (1024 * 1024)).toFixed(1)} MB`;
}

/** A file name safe to store and to send back in Content-Disposition. */
export function cleanFilename(name: string) {
  const base = name.split(/[\\/]/).pop() ?? "";
  const cleaned = base.replace(/[\u0000-\u001f\u007f"]/g, "").trim().slice(0, 200);
  return cleaned || "science-case.pdf";
}

/** `%PDF-` within the first 1024 bytes, as PDF readers accept it (ISO 32000-1, annex H). */
export function hasPdfHeader(bytes: Uint8Array) {
  const head = Buffer.from(bytes.subarray(0, 1024)).toString("latin1");
  return head.includes("%PDF-");
}

type ActiveKind = "JavaScript" | "a launch action" | "an embedded file" | "a javascript: link";

const ACTIVE_KEYS: Record<string, ActiveKind> = {
  "/JS": "JavaScript",
  "/JavaScript": "JavaScript",
  "/EmbeddedFile": "an embedded file",
  "/EmbeddedFiles": "an embedded file",
  "/EF": "an embedded file",
  "/Launch": "a launch action",
};
const ACTIVE_ACTIONS: Record<string, ActiveKind> = {
  "/JavaScript": "JavaScript",
  "/Launch": "a launch action",
  "/GoToE": "an embedded file",
};

function textOf(value: PDFObject | undefined): string | null {
  if (value instanceof PDFString || value instanceof PDFHexString) return value.decodeText();
  return null;
}

/**
 * Every kind of active content in the PDF: each object of the file (pdf-lib has already
 * unpacked object streams and decoded `#xx` escapes in names) is walked, dictionaries, arrays
 * and stream dictionaries alike, so an action hidden in a page's annotation or in the
 * document's open action is found wherever it sits.
 */
export function activeContentOf(doc: PDFDocument): ActiveKind[] {
  const found = new Set<ActiveKind>();
  const seen = new Set<PDFObject>();
  const visit = (obj: PDFObject | undefined, depth: number) => {
    if (!obj || depth > 64 || seen.has(obj)) return;
    seen.add(obj);
    if (obj instanceof PDFStream) return visit(obj.dict, depth + 1);
    if (obj instanceof PDFArray) {
      for (const item of obj.asArray()) visit(item, depth + 1);
      return;
    }
    if (!(obj instanceof PDFDict)) return;
    for (const [key, value] of obj.entries()) {
      const name = key.asString();
      if (ACTIVE_KEYS[name]) found.add(ACTIVE_KEYS[name]);
      if (name === "/S" && value instanceof PDFName && ACTIVE_ACTIONS[value.asString()]) found.add(ACTIVE_ACTIONS[value.asString()]);
      if (name === "/URI" || name === "/F") {
        const uri = textOf(value);
        // control characters and spaces are ignored by browsers before the scheme
        if (uri !== null && /^javascript:/i.test(uri.replace(/[\u0000-\u0020]/g, ""))) found.add("a javascript: link");
      }
      visit(value, depth + 1);
    }
  };
  for (const [, obj] of doc.context.enumerateIndirectObjects()) visit(obj, 0);
  visit(doc.context.trailerInfo.Root, 0);
  return [...found];
}

function listed(kinds: string[]) {
  return kinds.length <= 1 ? kinds.join("") : `${kinds.slice(0, -1).join(", ")} and ${kinds[kinds.length - 1]}`;
}

/** Page count of an acceptable science case, or a refusal that says what is wrong. */
export async function checkScienceCasePdf(bytes: Uint8Array, pageLimit: number): Promise<number> {
  if (bytes.byteLength === 0) throw refuse("The file is empty. Choose the PDF of the science case.");
  if (bytes.byteLength > SCIENCE_CASE_MAX_BYTES) {
    throw refuse(`The file is ${megabytes(bytes.byteLength)}; the limit is ${megabytes(SCIENCE_CASE_MAX_BYTES)}. Reduce the resolution of its figures and upload it again.`);
  }
  if (!hasPdfHeader(bytes)) {
    throw refuse("This file is not a PDF: its content does not begin with the PDF signature (%PDF-), whatever its name says. Export the science case as PDF and upload that file.");
  }
  let doc: PDFDocument;
  try {
    doc = await PDFDocument.load(bytes, { updateMetadata: false, throwOnInvalidObject: true });
  } catch (error) {
    const name = error instanceof Error ? error.constructor.name : "";
    if (name === "EncryptedPDFError" || /encrypt/i.test(String((error as Error)?.message))) {
      throw refuse("The PDF is encrypted or password-protected. Upload an unprotected copy, so the committee can read it and it can be bound into the proposal PDF.");
    }
    throw refuse("The file starts like a PDF but cannot be read: it may be damaged or cut short. Export it again and upload the new file.");
  }
  const active = activeContentOf(doc);
  if (active.length > 0) {
    throw refuse(
      `The PDF contains ${listed(active)}, which could run on the reviewers' computers; such PDFs are not accepted. Export or print the science case to a plain PDF (without scripts, actions or attachments) and upload that file.`,
    );
  }
  let pages: number;
  try {
    pages = doc.getPageCount();
    // It must also be possible to bind its pages into the proposal PDF.
    const probe = await PDFDocument.create();
    await probe.copyPages(doc, [0]);
  } catch {
    throw refuse("The PDF's page tree cannot be read: it may be damaged. Export it again and upload the new file.");
  }
  if (pages === 0) throw refuse("The PDF has no pages.");
  if (pages > pageLimit) throw refuse(`The science case has ${pages} pages; this call allows ${pageLimit}.`);
  return pages;
}

export async function storeScienceCase({
  proposalId,
  user,
  file,
  pageLimit,
}: {
  proposalId: number;
  user: Actor;
  file: { name: string; type: string; bytes: Uint8Array };
  pageLimit?: number;
}): Promise<ScienceCaseInfo> {
  const access = await getProposalForUser({ proposalId, user });
  assertEditable(access);
  const limit = pageLimit ?? access.call.pageLimit;
  const pageCount = await checkScienceCasePdf(file.bytes, limit);
  const sha256 = createHash("sha256").update(file.bytes).digest("hex");
  const filename = cleanFilename(file.name);
  return sequelize.transaction(async (transaction) => {
    const previous = await StoredFile.findOne({ where: { proposalId, kind: SCIENCE_CASE_KIND }, order: [["id", "DESC"]], attributes: ["id"], transaction });
    const stored = await StoredFile.create(
      {
        proposalId,
        kind: SCIENCE_CASE_KIND,
        filename,
        contentType: "application/pdf",
        sizeBytes: file.bytes.byteLength,
        sha256,
        pageCount,
        data: Buffer.from(file.bytes),
        uploadedById: user.id,
      },
      { transaction },
    );
    await writeAudit(
      {
        actorId: user.id,
        action: previous ? "science_case.replaced" : "science_case.uploaded",
        entityType: "stored_file",
        entityId: stored.id,
        proposalId,
        details: { filename, pageCount, sizeBytes: file.bytes.byteLength, sha256, pageLimit: limit, ...(previous ? { replacesFileId: previous.id } : {}) },
      },
      transaction,
    );
    return { id: stored.id, filename, pageCount, sizeBytes: stored.sizeBytes, createdAt: stored.createdAt.toISOString(), sha256, uploadedBy: null };
  });
}

/** The newest science case of a proposal (no access check: callers have done it). */
export async function latestScienceCase({ proposalId }: { proposalId: number }): Promise<{ id: number; filename: string; pageCount: number; sizeBytes: number; createdAt: Date } | null> {
  const f = await StoredFile.findOne({
    where: { proposalId, kind: SCIENCE_CASE_KIND },
    order: [["id", "DESC"]],
    attributes: ["id", "filename", "pageCount", "sizeBytes", "createdAt"],
  });
  return f ? { id: f.id, filename: f.filename, pageCount: f.pageCount ?? 0, sizeBytes: f.sizeBytes, createdAt: f.createdAt } : null;
}

/** The bytes of the newest science case, for binding into the proposal PDF. */
export async function latestScienceCaseBytes({ proposalId }: { proposalId: number }): Promise<Uint8Array | null> {
  const f = await StoredFile.findOne({ where: { proposalId, kind: SCIENCE_CASE_KIND }, order: [["id", "DESC"]] });
  return f ? new Uint8Array(f.data) : null;
}

/** Every version, newest first, for the team. */
export async function scienceCaseHistory({ proposalId, user }: { proposalId: number; user: Actor }): Promise<ScienceCaseInfo[]> {
  await getProposalForUser({ proposalId, user });
  const files = await StoredFile.findAll({
    where: { proposalId, kind: SCIENCE_CASE_KIND },
    order: [["id", "DESC"]],
    attributes: ["id", "filename", "pageCount", "sizeBytes", "createdAt", "sha256", "uploadedById"],
    include: [{ model: User, as: "uploadedBy", attributes: ["name", "email"] }],
  });
  return files.map((f) => {
    const by = (f as StoredFile & { uploadedBy?: User | null }).uploadedBy;
    return {
      id: f.id,
      filename: f.filename,
      pageCount: f.pageCount ?? 0,
      sizeBytes: f.sizeBytes,
      createdAt: f.createdAt.toISOString(),
      sha256: f.sha256,
      uploadedBy: by ? (by.name ?? by.email) : null,
    };
  });
}

/** A stored file of a proposal the user is on the team of; 404 otherwise (also for other proposals' files). */
export async function getProposalFileForUser({ proposalId, fileId, user }: { proposalId: number; fileId: number; user: Actor }) {
  await getProposalForUser({ proposalId, user });
  const file = Number.isSafeInteger(fileId) && fileId > 0 ? await StoredFile.findOne({ where: { id: fileId, proposalId } }) : null;
  if (!file) throw new Refusal("There is no such file in this proposal.", { status: 404, field: "fileId" });
  return file;
}

/**
 * Reads a multipart body with a byte cap before parsing, so an oversized upload is refused
 * without being buffered whole. Returns null when the body is over the cap.
 */
export async function readLimitedFormData(request: Request, maxBytes: number): Promise<FormData | null> {
  const declared = Number(request.headers.get("Content-Length") ?? "NaN");
  if (Number.isFinite(declared) && declared > maxBytes) return null;
  if (!request.body) return readForm(request);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel();
      return null;
    }
    chunks.push(value);
  }
  const body = new Uint8Array(total);
  let offset = 0;
  for (const c of chunks) {
    body.set(c, offset);
    offset += c.byteLength;
  }
  // a body that is not a well-formed form (JSON, a cut multipart) is a 400, not a 500
  return readForm(new Request(request.url, { method: "POST", headers: { "Content-Type": request.headers.get("Content-Type") ?? "" }, body }));
}
