// Sending the demo's decisions on a real MariaDB and mail catcher (tests/bench/services.ts): the
// seeder has sent them already, so they are taken back first (letters, their mails, the fees)
// and sent again through sendDecisions; then the queue is drained to the mail catcher, letters
// with their PDFs. The queue's own throughput is measured on plain messages as well.
import { benchServices } from "./services";

const fmt = (ms: number) => (ms >= 1000 ? `${(ms / 1000).toFixed(2)} s` : `${ms.toFixed(1)} ms`);

export async function runDecisionsBench(): Promise<string[]> {
  const services = await benchServices();
  const lines: string[] = [];
  try {
    const { Call, Charge, DecisionBatch, DecisionLetter, OutgoingMail, Proposal, User } = await import("../../app/models/index.server");
    const { demoCallPlan } = await import("../../sequelize/seeders/20261201000100-demo-observatory");
    const { sendDecisions, batchProgress } = await import("../../app/lib/decisions/send.server");
    const { drainMailQueue, enqueueMail } = await import("../../app/lib/mail/queue.server");

    const call = (await Call.findOne({ where: { semesterCode: demoCallPlan(new Date()).running.semesterCode } }))!;
    const admin = (await User.findOne({ where: { email: "admin@kestrel-ridge.example" } }))!;
    const seeded = await DecisionLetter.findAll({ where: { callId: call.id } });
    const ids = seeded.map((l) => l.proposalId as number);
    lines.push(`seeded (20261202081100-demo-decisions): ${seeded.length} letters of ${call.semesterCode}, ${await OutgoingMail.count({ where: { kind: "decision-letter", status: "pending" } })} e-mails waiting for the app's mail worker`);
    await DecisionBatch.destroy({ where: { callId: call.id } });
    await DecisionLetter.destroy({ where: { callId: call.id } });
    await Charge.destroy({ where: { proposalId: ids } });
    await Proposal.update({ decisionSentAt: null }, { where: { id: ids } });
    await OutgoingMail.destroy({ where: {} });

    let t = performance.now();
    const sent = await sendDecisions({ actor: admin, callId: call.id });
    const queueMs = performance.now() - t;
    t = performance.now();
    let drained = 0;
    for (;;) {
      const r = await drainMailQueue({ limit: 1000 });
      drained += r.sent;
      if (r.sent + r.failed === 0) break;
    }
    const drainMs = performance.now() - t;
    const progress = await batchProgress({ id: sent.batch!.id });
    lines.push(`demo decisions: ${sent.letters} letters, ${sent.mails} e-mails (PI and Co-Is)`);
    lines.push(`  queue (one transaction per proposal, fees raised)   ${fmt(queueMs).padStart(9)}`);
    lines.push(`  drain to the mail catcher (PDF per letter)          ${fmt(drainMs).padStart(9)}   ${(drained / (drainMs / 1000)).toFixed(1)} messages/s`);
    lines.push(`  send all → 100 %                                    ${fmt(queueMs + drainMs).padStart(9)}   (progress: ${progress?.sent}/${progress?.total} sent)`);

    const N = 200;
    for (let i = 0; i < N; i++) await enqueueMail({ to: `bench-${i}@bench.example`, subject: `Bench ${i}`, text: "A plain message of the queue's throughput bench." });
    t = performance.now();
    let plain = 0;
    for (;;) {
      const r = await drainMailQueue({ limit: 1000 });
      plain += r.sent;
      if (r.sent + r.failed === 0) break;
    }
    const plainMs = performance.now() - t;
    lines.push(`mail queue, ${N} plain messages to the mail catcher   ${fmt(plainMs).padStart(9)}   ${(plain / (plainMs / 1000)).toFixed(1)} messages/s`);
  } finally {
    await services.stop();
  }
  return lines;
}
