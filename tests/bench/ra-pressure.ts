// RA pressure benchmark (issue 12: ≤ 100 ms warm for a semester): the pure computation of
// app/lib/allocation/ra-pressure.ts for one telescope over a 181-night semester, with the site's
// nights prepared (as the board's feasibility sheets leave them), for 300 and 600 invented
// observations; and, on a throwaway MariaDB with the demo seeded, the server part for the demo
// call in review (loading the call, the clear fractions and every board proposal's feasibility sheet).
import { raPressure, type RaObservation } from "../../app/lib/allocation/ra-pressure";
import { ensureMoonTimes, prepareSiteNights, type Site } from "../../app/lib/astro/visibility";
import type { MoonCategory } from "../../app/lib/domain";
import { benchServices } from "./services";

const SITE: Site = { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" }; // invented
const FROM = "2027-02-01";
const NIGHTS = 181;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const ms = (f: () => void) => {
  const t = performance.now();
  f();
  return performance.now() - t;
};
const verdict = (v: number, goal: number) => `${v.toFixed(1)} ms   goal ≤ ${goal} ms  ${v <= goal ? "met" : `MISSED by ${(v - goal).toFixed(1)} ms`}`;

function observations(n: number): RaObservation[] {
  let s = 20261202;
  const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647);
  const moons: MoonCategory[] = ["dark", "grey", "bright"];
  return Array.from({ length: n }, (_, i) => ({
    observationId: i + 1,
    proposalId: Math.floor(i / 2) + 1,
    target: { raDeg: 360 * rnd(), decDeg: -30 + 110 * rnd(), pmRaCosDecMasPerYr: rnd() < 0.3 ? 50 * rnd() : 0, pmDecMasPerYr: 0 },
    minAltitudeDeg: 30,
    moonCategory: moons[i % 3],
    requestedHours: 1 + 20 * rnd(),
  }));
}

export async function runRaPressureBench(): Promise<string[]> {
  const lines: string[] = [];
  const prepared = prepareSiteNights(SITE, FROM, NIGHTS);
  ensureMoonTimes(prepared);
  const clearFractions = [2, 3, 4, 5, 6, 7].map((month) => ({ month, clearFraction: 0.6 + month / 50 }));
  for (const n of [300, 600]) {
    const obs = observations(n);
    raPressure({ prepared, clearFractions, observations: obs }); // warm-up
    const runs = Array.from({ length: 7 }, () => ms(() => raPressure({ prepared, clearFractions, observations: obs })));
    lines.push(`RA pressure, ${NIGHTS} nights (site prepared), ${n} observations, warm (median of 7): ${verdict(median(runs), 100)}`);
  }
  const empty = Array.from({ length: 7 }, () => ms(() => raPressure({ prepared, clearFractions, observations: [] })));
  lines.push(`  of which the available side alone (no observations): ${median(empty).toFixed(2)} ms`);

  const services = await benchServices();
  try {
    const { Call, Proposal } = await import("../../app/models/index.server");
    const { callRaPressure, offeredTelescopes } = await import("../../app/lib/allocation/ra-pressure.server");
    const { BOARD_STATES } = await import("../../app/lib/allocation/board.server");
    const { Op } = await import("sequelize");
    const inReview = await Proposal.findOne({ where: { status: { [Op.in]: [...BOARD_STATES] } }, order: [["callId", "DESC"]] });
    const call = inReview ? await Call.findByPk(inReview.callId as number) : null;
    if (!call) lines.push("no demo call with proposals on a board: server part not measured");
    else {
      const [telescope] = await offeredTelescopes({ callId: call.id });
      const count = await Proposal.count({ where: { callId: call.id, status: { [Op.in]: [...BOARD_STATES] } } });
      const once = async () => {
        const t = performance.now();
        const r = await callRaPressure({ callId: call.id, telescopeId: telescope.id });
        return { ms: performance.now() - t, r };
      };
      const cold = await once();
      const warm: number[] = [];
      for (let i = 0; i < 5; i++) warm.push((await once()).ms);
      lines.push(`server part on the demo call ${call.semesterCode} (${count} proposals on the board, ${cold.r.observations} observations on ${telescope.name}): cold ${cold.ms.toFixed(0)} ms, warm ${median(warm).toFixed(0)} ms (median of 5; mostly the proposals' feasibility sheets, which the board computes too)`);
    }
  } finally {
    await services.stop();
  }
  return lines;
}
