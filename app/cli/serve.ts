// Serves the production build: `tsx app/cli/serve.ts` (the start command runs it for you).
import { parseTrustProxy } from "../lib/http/front-rules";
import { createHttpApp, loadBuild } from "./http-app";
import { loadEnvFiles } from "./load-env";
import { repoRoot } from "./services";

loadEnvFiles();
process.env.NODE_ENV ??= "production";
const host = process.env.HOST ?? "127.0.0.1";
const port = Number(process.env.PORT ?? 3000);

const trustProxy = parseTrustProxy(process.env.TRUST_PROXY);
if (!trustProxy.ok) {
  console.error(`[app] TRUST_PROXY ${trustProxy.message}`);
  process.exit(1);
}
const { build, clientDir } = await loadBuild(repoRoot);
const app = createHttpApp({ build, clientDir, trustProxy: trustProxy.value });
const server = app.listen(port, host, () => console.log(`[app] listening on http://${host}:${port}`));
server.on("error", (error) => {
  console.error(`[app] cannot listen on ${host}:${port}: ${error.message}`);
  process.exit(1);
});
for (const signal of ["SIGINT", "SIGTERM"] as const) {
  process.on(signal, () => server.close(() => process.exit(0)));
}
