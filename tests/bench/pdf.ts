// The proposal PDF (5, 50 and 500 targets) and submission through the data layer, on a real
// MariaDB (tests/bench/services.ts). Warm = median of repeated builds after one warm-up build;
// cold = the first build in this process (fonts not loaded yet).
import { benchServices } from "./services";

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const fmt = (ms: number) => (ms >= 1000 ? `${(ms / 1000).toFixed(2)} s` : `${ms.toFixed(0)} ms`);
const verdict = (ms: number, goal: number) => `${fmt(ms).padStart(8)}   goal ≤ ${fmt(goal)}  ${ms <= goal ? "met" : `MISSED by ${fmt(ms - goal)}`}`;

export async function runPdfBench(): Promise<string[]> {
  const services = await benchServices();
  const lines: string[] = [];
  try {
    const { Observation, Target, User } = await import("../../app/models/index.server");
    const { instrumentOptions } = await import("../../app/lib/proposals/observations.server");
    const { observationSchema, targetSchema } = await import("../../app/lib/schemas/proposals");
    const { buildProposalPdf } = await import("../../app/lib/proposals/pdf.server");
    const { submitProposal } = await import("../../app/lib/proposals/submit.server");
    const { readyProposal, testCall } = await import("../integration/proposals-fixtures");

    const user = await User.create({ email: `bench-${Date.now()}@bench.example`, name: "Bench PI", institution: "Bench Institute", lastSignInAt: null });
    const call = await testCall();
    const [option] = await instrumentOptions({ callId: call.id });
    const filter = option.filters.find((f) => f.band === "V") ?? option.filters[0];
    // The first target through the data layer (readyProposal), the others in bulk (the data layer
    // checks duplicates against every target, which would make set-up quadratic).
    async function proposalWith(n: number) {
      const { proposal } = await readyProposal({ user, callId: call.id, title: `Bench survey of ${n} invented fields` });
      const inputs = Array.from({ length: n - 1 }, (_, k) => {
        const i = k + 1;
        const ra = (i * 137.508) % 360;
        const dec = -20 + ((i * 53.7) % 80);
        return targetSchema.parse({ name: `Bench Field ${i + 1}`, ra: (ra / 15).toFixed(5), dec: dec.toFixed(4), pmra: "", pmdec: "", magnitude: "16.0", band: "V", notes: "" });
      });
      const targets = await Target.bulkCreate(
        inputs.map((t) => ({ proposalId: proposal.id, name: t.name, raDeg: t.raDeg, decDeg: t.decDeg, pmRaMasPerYr: t.pmra, pmDecMasPerYr: t.pmdec, magnitude: t.magnitude, band: t.band, notes: t.notes })),
      );
      await Observation.bulkCreate(
        targets.map((t) => {
          const { mode: _mode, ...columns } = observationSchema.parse({ targetId: t.id, instrumentId: option.instrumentId, filterId: filter.id, mode: "snr", snrGoal: "30", framesPerEpoch: "1", epochsPerSemester: "1", moonCategory: "dark", maxAirmass: "2", seeingArcsec: "1.2" });
          return { proposalId: proposal.id, ...columns };
        }),
      );
      return proposal.id;
    }
    const sizes = [5, 50, 500] as const;
    const ids: Record<number, number> = {};
    for (const n of sizes) ids[n] = await proposalWith(n);

    const goals: Record<number, number> = { 5: 150, 50: 500, 500: 1500 };
    let t = performance.now();
    await buildProposalPdf({ proposalId: ids[5] });
    lines.push(`PDF, 5 targets, cold (first build in the process)  ${fmt(performance.now() - t)}`);
    for (const n of sizes) {
      const runs = n === 500 ? 5 : 9;
      await buildProposalPdf({ proposalId: ids[n] });
      const times: number[] = [];
      for (let i = 0; i < runs; i++) {
        t = performance.now();
        await buildProposalPdf({ proposalId: ids[n] });
        times.push(performance.now() - t);
      }
      lines.push(`PDF, ${String(n).padStart(3)} targets, warm median of ${runs}  ${verdict(median(times), goals[n])}${n === 50 ? " (no goal in the issue; 500 ms is ours)" : ""}`);
    }

    // Submission of a 50-target proposal (the checklist, the transaction and the queued receipt).
    const times: number[] = [];
    for (let i = 0; i < 5; i++) {
      const id = await proposalWith(50);
      t = performance.now();
      await submitProposal({ user, proposalId: id });
      times.push(performance.now() - t);
    }
    lines.push(`submitting a 50-target proposal, median of 5  ${verdict(median(times), 200)} (data layer, no HTTP)`);
  } finally {
    await services.stop();
  }
  return lines;
}
