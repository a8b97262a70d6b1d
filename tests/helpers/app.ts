import type { Server } from "node:http";
import path from "node:path";
import type { Response as AgentResponse } from "superagent";
import supertest from "supertest";
import { UNSAFE_decodeViaTurboStream as decodeTurboStream, type ServerBuild } from "react-router";
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

/**
 * Posts a form as the browser's router does (to `<path>.data`) and decodes what the action
 * answered, so a test can read the 400's `values` and `errors` rather than search the page's text.
 * `fields` are pairs, so a name can repeat (ticked boxes).
 */
export async function postForAnswer(path: string, cookie: string, fields: [string, string | number][]) {
  const [pathname, search] = path.split("?");
  const res = await (await request())
    .post(`${pathname}.data${search ? `?${search}` : ""}`)
    .set("Cookie", cookie)
    .type("form")
    .send(new URLSearchParams(fields.map(([k, v]) => [k, String(v)])).toString())
    .buffer(true)
    .parse(textBody);
  return { status: res.status, answer: (await decodeData(res.body as string)) as { data?: unknown; error?: unknown } };
}

/** supertest's parser for a body taken as text whatever its type (a `.data` turbo-stream, a CSV). */
export function textBody(res: AgentResponse, done: (error: Error | null, body: unknown) => void) {
  const stream = res as unknown as NodeJS.ReadableStream; // in node, superagent hands over the response stream
  let text = "";
  stream.setEncoding("utf8");
  stream.on("data", (chunk: string) => (text += chunk));
  stream.on("end", () => done(null, text));
}

/** A `.data` answer (React Router's single fetch) decoded. */
export async function decodeData(text: string): Promise<unknown> {
  const decoded = await decodeTurboStream(new Response(text).body!, globalThis);
  await decoded.done;
  return decoded.value;
}
