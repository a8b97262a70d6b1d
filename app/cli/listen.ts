// Serves the built app on HOST:PORT until SIGINT/SIGTERM. Used by `npm run serve` (production)
// and by the local `npm start` (through serve-local.ts). The build is build/, or
// NIGHTSHARE_BUILD_DIR as `react-router build` took it (from the working directory).
import { existsSync } from "node:fs";
import path from "node:path";
import { parseTrustProxy } from "../lib/http/front-rules";
import { createHttpApp, loadBuild } from "./http-app";
import { repoRoot } from "./services";

export async function serveBuild() {
  const host = process.env.HOST ?? "127.0.0.1";
  const port = Number(process.env.PORT ?? 3000);
  const buildDir = path.resolve(process.env.NIGHTSHARE_BUILD_DIR ?? path.join(repoRoot, "build"));
  if (!existsSync(path.join(buildDir, "server/index.js"))) {
    console.error(`[app] no build in ${buildDir}: run \`npm run build\` first.`);
    process.exit(1);
  }
  const trustProxy = parseTrustProxy(process.env.TRUST_PROXY);
  if (!trustProxy.ok) {
    console.error(`[app] TRUST_PROXY ${trustProxy.message}`);
    process.exit(1);
  }
  const { build, clientDir } = await loadBuild(buildDir);
  const app = createHttpApp({ build, clientDir, trustProxy: trustProxy.value });
  const server = app.listen(port, host, () => console.log(`[app] listening on http://${host}:${port}`));
  server.on("error", (error) => {
    console.error(`[app] cannot listen on ${host}:${port}: ${error.message}`);
    process.exit(1);
  });
  for (const signal of ["SIGINT", "SIGTERM"] as const) {
    process.on(signal, () => server.close(() => process.exit(0)));
  }
}
