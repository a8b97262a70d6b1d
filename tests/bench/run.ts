// `npm run bench`: prints timings; nothing here is asserted (timings are not tests).
//   npm run bench               everything
//   npm run bench -- pdf        one section (visibility, review, board, ra-pressure, semester-check, pages, load, pdf, decisions, restart;
//                               `share`: only the load section's framework share)
import { spawnSync } from "node:child_process";
import { availableParallelism, loadavg } from "node:os";
import { fileURLToPath } from "node:url";
import { runAstroBench } from "./astro";
import { runBoardBench } from "./board";
import { runDecisionsBench } from "./decisions";
import { runLoadBench, runShareBench } from "./load";
import { runPagesBench } from "./pages";
import { runPdfBench } from "./pdf";
import { runRaPressureBench } from "./ra-pressure";
import { runRestartBench } from "./restart";
import { runReviewBench } from "./review";
import { runSemesterCheckBench } from "./semester-check";

const SECTIONS = ["visibility", "review", "board", "ra-pressure", "semester-check", "pages", "load", "pdf", "decisions", "restart"];
const only = process.argv[2];
if (!process.env.BENCH_SECTION_ONLY) console.log(`Nightshare benchmarks — node ${process.version}, ${new Date().toISOString()}`);
if (only && only !== "share" && !SECTIONS.includes(only)) {
  console.error(`No section "${only}". Sections: ${SECTIONS.join(", ")}, share.`);
  process.exit(2);
}
if (!only) {
  // Every section in a process of its own: each starts (and at its end closes) its own database
  // and the app's modules, whose connection cannot be opened again in the same process.
  let failed = 0;
  for (const section of SECTIONS) {
    const run = spawnSync(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), section], { stdio: "inherit", env: { ...process.env, BENCH_SECTION_ONLY: "1" } });
    if (run.status !== 0) failed++;
  }
  process.exit(failed ? 1 : 0);
}
const want = (name: string) => only === name;
// Figures are only comparable on a quiet machine: a load above the number of cores inflates them.
console.log(`\nmachine: ${availableParallelism()} cores, load average ${loadavg().map((l) => l.toFixed(1)).join(" / ")} (1/5/15 min)`);
if (want("visibility")) {
  console.log("\n[visibility]");
  for (const line of runAstroBench()) console.log("  " + line);
}
if (want("review")) {
  console.log("\n[review: reviewer suggestion]");
  for (const line of runReviewBench()) console.log("  " + line);
}
if (want("board")) {
  console.log("\n[allocation: ranking board]");
  for (const line of await runBoardBench()) console.log("  " + line);
}
if (want("ra-pressure")) {
  console.log("\n[allocation: RA pressure]");
  for (const line of await runRaPressureBench()) console.log("  " + line);
}
if (want("semester-check")) {
  console.log("\n[semester check]");
  for (const line of await runSemesterCheckBench()) console.log("  " + line);
}
if (want("pages")) {
  console.log("\n[pages people wait for, through HTTP]");
  for (const line of await runPagesBench()) console.log("  " + line);
}
if (want("load")) {
  console.log("\n[load: concurrent keep-alive clients]");
  for (const line of await runLoadBench()) console.log("  " + line);
}
if (only === "share") {
  console.log("\n[framework's share: the visibility API through our front against bare node:http]");
  for (const line of await runShareBench()) console.log("  " + line);
}
if (want("pdf")) {
  console.log("\n[proposal PDF and submission]");
  for (const line of await runPdfBench()) console.log("  " + line);
}
if (want("decisions")) {
  console.log("\n[decisions: sending the demo's letters]");
  for (const line of await runDecisionsBench()) console.log("  " + line);
}
if (want("restart")) {
  console.log("\n[restart: npm start]");
  for (const line of await runRestartBench()) console.log("  " + line);
}
process.exit(0);
