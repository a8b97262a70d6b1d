import type { Server } from "node:http";
import path from "node:path";
import supertest from "supertest";
import type { ServerBuild } from "react-router";
import { createHttpApp } from "~/cli/http-app";
import { testEnv } from "./env";

let cached: ReturnType<typeof createHttpApp> | null = null;

/** The built app (the same express front as `npm start`) on the test database. */
export async function testApp() {
  if (!cached) {
    const build = (await import(/* @vite-ignore */ path.join(testEnv.buildDir, "server/index.js"))) as ServerBuild;
    cached = createHttpApp({ build, clientDir: path.join(testEnv.buildDir, "client") });
  }
  return cached;
}

/** A supertest agent; pass `cookie` to act as a signed-in user. */
export async function request() {
  return supertest(await testApp());
}

/** Listens on the run's APP_URL port (for the browser and for webhooks from the payment fake). */
export async function listen(): Promise<{ url: string; close(): Promise<void> }> {
  const app = await testApp();
  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(testEnv.appPort, "127.0.0.1", () => resolve(s));
    s.once("error", reject);
  });
  return {
    url: testEnv.appUrl,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

/** Form bodies as a browser posts them. */
export function form(values: Record<string, string | number | boolean>) {
  return new URLSearchParams(Object.entries(values).map(([k, v]) => [k, String(v)])).toString();
}
