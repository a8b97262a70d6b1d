// The HTTP front of the app: static files from the client build, then React Router's request
// handler. Shared by `npm start` and the integration and browser tests, so both run the same stack.
import path from "node:path";
import { createRequestHandler } from "@react-router/express";
import express from "express";
import type { ServerBuild } from "react-router";

export function createHttpApp({ build, clientDir, trustProxy = false }: { build: ServerBuild; clientDir: string; trustProxy?: boolean }) {
  const app = express();
  app.disable("x-powered-by");
  // Behind a reverse proxy set TRUST_PROXY=1 so that req.ip is the client's, not the proxy's.
  app.set("trust proxy", trustProxy);
  app.use("/assets", express.static(path.join(clientDir, "assets"), { immutable: true, maxAge: "1y" }));
  app.use(express.static(clientDir, { maxAge: "1h", index: false }));
  app.use((req, _res, next) => {
    // Overwritten on every request, so a client cannot choose its own rate-limit bucket.
    req.headers["x-nightshare-client-ip"] = req.ip ?? req.socket.remoteAddress ?? "unknown";
    next();
  });
  app.use(createRequestHandler({ build, mode: process.env.NODE_ENV }));
  return app;
}

export async function loadBuild(root: string) {
  const serverEntry = path.join(root, "build/server/index.js");
  const build = (await import(serverEntry)) as ServerBuild;
  return { build, clientDir: path.join(root, "build/client") };
}
