// The self-reference check of a dual-anonymous call's science case: the PDF's text per page
// (unpdf, a serverless build of PDF.js) searched for the team (self-reference.ts). Stored files are
// never overwritten, so a file's text is kept by its id (bounded LRU).
import { extractText, getDocumentProxy } from "unpdf";
import { Lru } from "~/lib/lru";
import { SCIENCE_CASE_KIND } from "~/lib/proposals/science-case";
import { Call, ProposalMember, StoredFile, User } from "~/models/index.server";
import { findSelfReferences, type SelfReferenceWarning } from "./self-reference";

const texts = new Lru<number, string[] | "unreadable">(64);

/** The text of each page of a PDF (an empty string for a page without text: a scan). */
export async function pdfPageTexts(bytes: Uint8Array): Promise<string[]> {
  // PDF.js takes over (detaches) the buffer it is given: hand it a copy
  const pdf = await getDocumentProxy(new Uint8Array(bytes));
  try {
    const { text } = await extractText(pdf, { mergePages: false });
    return text;
  } finally {
    await pdf.destroy();
  }
}

export type SelfReferenceCheck = {
  filename: string;
  pageCount: number;
  /** the text could not be read (then nothing was checked) */
  unreadable: boolean;
  /** pages without any text (scanned images cannot be checked) */
  pagesWithoutText: number[];
  warnings: SelfReferenceWarning[];
};

/**
 * For a draft of a dual-anonymous call before its deadline: where its latest science case names
 * the team. Null when the check does not apply (named call, deadline passed) or nothing is uploaded.
 */
export async function selfReferenceCheck({ proposalId, call, now = new Date() }: { proposalId: number; call: Pick<Call, "teamVisibility" | "deadlineAt">; now?: Date }): Promise<SelfReferenceCheck | null> {
  if (call.teamVisibility !== "dual_anonymous" || now >= call.deadlineAt) return null;
  const file = await StoredFile.findOne({ where: { proposalId, kind: SCIENCE_CASE_KIND }, order: [["id", "DESC"]], attributes: ["id", "filename", "pageCount"] });
  if (!file) return null;
  let pages = texts.get(file.id);
  if (!pages) {
    const withData = await StoredFile.findByPk(file.id, { attributes: ["id", "data"] });
    try {
      pages = await pdfPageTexts(new Uint8Array(withData!.data));
    } catch (error) {
      console.error(`text of stored file ${file.id} could not be extracted`, error);
      pages = "unreadable";
    }
    texts.set(file.id, pages);
  }
  const base = { filename: file.filename, pageCount: file.pageCount ?? 0 };
  if (pages === "unreadable") return { ...base, unreadable: true, pagesWithoutText: [], warnings: [] };
  const members = await ProposalMember.findAll({ where: { proposalId }, include: [{ model: User, as: "user", attributes: ["id", "name", "institution", "email"] }] });
  const team = members.map((m) => ({ name: m.user?.name ?? null, institution: m.user?.institution ?? null, email: m.user?.email ?? m.email }));
  return {
    ...base,
    unreadable: false,
    pagesWithoutText: pages.flatMap((t, i) => (t.trim() ? [] : [i + 1])),
    warnings: findSelfReferences({ pages, team }),
  };
}
