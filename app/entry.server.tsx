import { PassThrough } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isbot } from "isbot";
import { renderToPipeableStream } from "react-dom/server";
import { ServerRouter, type EntryContext, type HandleErrorFunction, isRouteErrorResponse, RouterContextProvider } from "react-router";
import { env } from "./lib/env.server";
import { databaseFailed, NONCE_HEADER } from "./lib/http/request-state";
import { isDatabaseUnavailable, RETRY_AFTER_SECONDS } from "./lib/http/service-errors";
import { startHousekeeping } from "./lib/housekeeping.server";
import { startMailWorker } from "./lib/mail/queue.server";
import { startReminderWorker } from "./lib/review/reminders.server";

export const streamTimeout = 5_000;

// The outgoing-mail worker lives in the server process (SKIP LOCKED keeps several processes apart).
if (env.MAIL_WORKER === "on") {
  startMailWorker();
  // review reminders 3 days before a review deadline: idempotent, so a check per process is safe
  startReminderWorker();
}
if (env.NODE_ENV !== "test") startHousekeeping();

/**
 * Logs like React Router's default, and marks a request whose loader or action hit an
 * unavailable database: the root middleware then answers 503 with Retry-After.
 */
export const handleError: HandleErrorFunction = (error, { request, context }) => {
  const inner = isRouteErrorResponse(error) && (error as { error?: unknown }).error ? (error as { error?: unknown }).error : error;
  if (isDatabaseUnavailable(inner) && context instanceof RouterContextProvider) context.set(databaseFailed, true);
  if (process.env.NODE_ENV !== "test" && !request.signal.aborted) console.error(inner);
};

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
    // The HTTP front puts this request's CSP nonce here; React Router's inline scripts carry it.
    // (`npm run dev` serves without the front, so without a nonce and without the CSP.)
    const nonce = request.headers.get(NONCE_HEADER) ?? undefined;
    const { pipe, abort } = renderToPipeableStream(<ServerRouter context={routerContext} url={request.url} nonce={nonce} />, {
      nonce,
      [readyOption]() {
        shellRendered = true;
        const body = new PassThrough();
        responseHeaders.set("Content-Type", "text/html");
        if (responseStatusCode === 503) responseHeaders.set("Retry-After", String(RETRY_AFTER_SECONDS));
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
