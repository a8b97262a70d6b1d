// Page-break decisions of the proposal PDF (app/lib/proposals/pdf.server.ts), kept pure so they can
// be tested without fonts or a database. y runs downwards from the page top (PDF points, origin at
// the page foot); `foot` is the lowest y a line's baseline may take.

/** Height a heading takes: 6 pt above, the text, its rule at 0.6 × size below, then size of space. */
export const headingHeight = (size: number) => 6 + size * 1.6;

/** Body lines that must follow a heading on its page (keep-with-next). */
export const KEEP_LINES = 2;

/** What a table must have on the page it starts on: its header row and up to KEEP_LINES body rows. */
export const tableLeadHeight = (rowHeight: number, bodyRows: number) => rowHeight * (1 + Math.min(KEEP_LINES, Math.max(0, bodyRows)));

/** Lines of text that must follow a heading: up to KEEP_LINES of them. */
export const linesLeadHeight = (lineHeight: number, lines = KEEP_LINES) => lineHeight * Math.min(KEEP_LINES, Math.max(1, lines));

/** Whether a block of `height` starting at y must begin on the next page. */
export const breaksBefore = (y: number, height: number, foot: number) => y - height < foot;
