// The pages people wait for, through HTTP on the built app (tests/bench/http.ts) with the demo
// seeded, signed in as the demo PI: the feasibility sheet of the 500-target survey, My proposals,
// GET /api/v1/proposals and GET /api/v1/proposals/:id of the survey. Warm = median of 9 after
// one warm-up; the first request is the first in this process (sheet computed, JIT cold).
import { against, benchApp, fmtKb, fmtMs, warmGet } from "./http";

export async function runPagesBench(): Promise<string[]> {
  const app = await benchApp();
  const lines: string[] = [];
  try {
    const { Proposal, ProposalMember, User } = await import("../../app/models/index.server");
    const pi = (await User.findOne({ where: { email: "pi@kestrel-ridge.example" } }))!;
    const survey = (await Proposal.findOne({ where: { title: "The Wren Survey: faint halo stars in 500 fields" } }))!;
    const mine = await ProposalMember.count({ where: { userId: pi.id } });
    const cookie = await app.cookieFor(pi.email);
    const kb = (b: number) => fmtKb(b);
    const row = (label: string, r: Awaited<ReturnType<typeof warmGet>>, goalMs: number, extra: string) =>
      `${label.padEnd(44)} first ${fmtMs(r.cold).padStart(9)}, warm ${fmtMs(r.warm).padStart(8)} ${against(r.warm, goalMs, fmtMs)}; ${kb(r.bytes)}, ${r.statements} SQL statements${extra}`;

    const sheet = await warmGet(app, `/proposals/${survey.id}/feasibility`, cookie);
    lines.push(row("feasibility sheet page, 500 targets", sheet, 150, ""));
    lines.push(`${"".padEnd(44)} HTML ${kb(sheet.bytes)}   ${against(sheet.bytes / 1024, 250, (x) => `${x.toFixed(0)} KB`)}`);
    const list = await warmGet(app, `/proposals`, cookie);
    lines.push(row(`My proposals, ${mine} proposals`, list, 60, ""));
    const api = await warmGet(app, `/api/v1/proposals`, cookie);
    lines.push(row(`GET /api/v1/proposals, ${mine} proposals`, api, 60, ""));
    const one = await warmGet(app, `/api/v1/proposals/${survey.id}`, cookie);
    lines.push(row("GET /api/v1/proposals/:id, 500 targets", one, 120, ""));
    lines.push(`${"".padEnd(44)} statements ${one.statements}   goal ≤ 10  ${one.statements <= 10 ? "met" : `MISSED by ${one.statements - 10}`}`);
  } finally {
    await app.stop();
  }
  return lines;
}
