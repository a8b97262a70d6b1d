// A setup file (tests/vitest.config.ts): before a test file imports the app, points this worker
// at its own slot from tests/run.ts — its database, mail catcher, payment fake and app port —
// so that files running at the same time never see each other's rows, mail or webhooks.
// VITEST_POOL_ID is 1…maxWorkers and unique among the files running at one time.
const slots = process.env.NIGHTSHARE_TEST_SLOTS;
if (slots) {
  const id = Number(process.env.VITEST_POOL_ID ?? "1");
  const slot = (JSON.parse(slots) as Record<string, string>[])[id - 1];
  if (!slot) throw new Error(`No test slot for vitest worker ${id}: tests/run.ts made ${JSON.parse(slots).length} (TEST_WORKERS); maxWorkers must not be larger.`);
  Object.assign(process.env, slot);
}
