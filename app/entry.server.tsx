import { PassThrough } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isbot } from "isbot";
import { renderToPipeableStream } from "react-dom/server";
import { ServerRouter, type EntryContext } from "react-router";
import { env } from "./lib/env.server";
import { startMailWorker } from "./lib/mail-queue.server";

export const streamTimeout = 5_000;

// The outgoing-mail worker lives in the server process (SKIP LOCKED keeps several processes apart).
if (env.MAIL_WORKER === "on") startMailWorker();

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
) {
  return new Promise<Response>((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    const readyOption = (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";
    const { pipe, abort } = renderToPipeableStream(<ServerRouter context={routerContext} url={request.url} />, {
      [readyOption]() {
        shellRendered = true;
        const body = new PassThrough();
        responseHeaders.set("Content-Type", "text/html");
        resolve(
          new Response(createReadableStreamFromReadable(body), { headers: responseHeaders, status: responseStatusCode }),
        );
        pipe(body);
      },
      onShellError(error: unknown) {
        reject(error);
      },
      onError(error: unknown) {
        responseStatusCode = 500;
        if (shellRendered) console.error(error);
      },
    });
    setTimeout(abort, streamTimeout + 1000);
  });
}
