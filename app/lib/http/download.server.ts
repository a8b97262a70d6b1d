// Downloads (CSV, iCalendar) that no cache keeps, and refusals as plain text for a download link.
import { Refusal } from "~/lib/forms";

/**
 * The policy of a stored file that a browser may show: a sandbox (no scripts, an origin of its
 * own, so no access to our cookies or pages) that loads nothing; framed by nothing, or (the
 * committee's inline science case) by our own pages. Chromium's PDF viewer shows a PDF under it.
 */
export function sandboxedFilePolicy(frameAncestors: "'none'" | "'self'" = "'none'") {
  return `sandbox; default-src 'none'; img-src data:; style-src 'unsafe-inline'; frame-ancestors ${frameAncestors}`;
}

/** A file download that no cache keeps (the board's numbers are the chair's only). */
export function downloadResponse(filename: string, contentType: string, body: string): Response {
  return new Response(body, {
    headers: {
      "Content-Type": contentType,
      "Content-Disposition": `attachment; filename="${filename.replace(/[^\w.-]+/g, "-")}"`,
      "Cache-Control": "private, no-store",
    },
  });
}

export const csvResponse = (filename: string, csv: string) => downloadResponse(filename, "text/csv; charset=utf-8", csv);

/** A refusal as plain text with its status (a download link has no form to put a message by). */
export function refusalText(error: unknown): Response {
  if (error instanceof Refusal) return new Response(error.message, { status: error.status, headers: { "Content-Type": "text/plain; charset=utf-8" } });
  throw error;
}

/** A CSV download of what `read` builds; a refusal (an unknown call) as plain text with its status. */
export async function csvDownload(read: Promise<{ filename: string; csv: string }>): Promise<Response> {
  try {
    const { filename, csv } = await read;
    return csvResponse(filename, csv);
  } catch (error) {
    return refusalText(error);
  }
}
