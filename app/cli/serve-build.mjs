// `npm run serve`, with no tsx: runs the production entry (serve.ts) as `npm run build` bundled
// it, <build>/cli/serve.mjs (app/cli/node-bundles.ts). Plain JavaScript, so that node runs it as is.
import { existsSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";

const buildDir = path.resolve(process.env.NIGHTSHARE_BUILD_DIR ?? path.join(import.meta.dirname, "../../build"));
const entry = path.join(buildDir, "cli/serve.mjs");
if (!existsSync(entry)) {
  console.error(`[serve] no ${path.relative(process.cwd(), entry) || entry}: run \`npm run build\` first.`);
  process.exit(1);
}
await import(pathToFileURL(entry).href);
