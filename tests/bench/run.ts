// `npm run bench`: prints timings; nothing here is asserted (timings are not tests).
import { runAstroBench } from "./astro";

console.log(`Nightshare benchmarks — node ${process.version}, ${new Date().toISOString()}`);
console.log("\n[visibility]");
for (const line of runAstroBench()) console.log("  " + line);
