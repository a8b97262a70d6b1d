import { useEffect } from "react";
import { data, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import type { Route } from "./+types/root";
import { ErrorPage } from "./components/ErrorPage";
import { megabytes } from "./lib/http/front-rules";
import { BODY_TOO_LARGE_HEADER, databaseFailed } from "./lib/http/request-state";
import { DATABASE_UNAVAILABLE_MESSAGE, RETRY_AFTER_SECONDS } from "./lib/http/service-errors";
import "./app.css";

export const links: Route.LinksFunction = () => [
  { rel: "icon", href: "/favicon.svg", type: "image/svg+xml" },
];

/**
 * Runs around every route: a body the HTTP front found too large becomes the 413 error page
 * (before any action reads it), and a request that hit an unavailable database answers 503 with
 * Retry-After — JSON on the API, the error page elsewhere — instead of a 500.
 */
export const middleware: Route.MiddlewareFunction[] = [
  async ({ request, context }, next) => {
    const limit = Number(request.headers.get(BODY_TOO_LARGE_HEADER));
    if (limit > 0) {
      throw data(
        { message: `What was sent is larger than ${megabytes(limit)}, the most this page takes at once. Nothing was saved; go back and send less (a smaller file, or the text in parts).` },
        { status: 413 },
      );
    }
    const response = await next();
    if (!context.get(databaseFailed)) return response;
    await response.body?.cancel().catch(() => undefined);
    const headers = { "Retry-After": String(RETRY_AFTER_SECONDS), "Cache-Control": "no-store" };
    if (new URL(request.url).pathname.startsWith("/api/")) {
      return Response.json({ error: DATABASE_UNAVAILABLE_MESSAGE, issues: [] }, { status: 503, headers });
    }
    throw data({ message: DATABASE_UNAVAILABLE_MESSAGE }, { status: 503, headers });
  },
];

export function meta() {
  return [{ title: "Nightshare" }];
}

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen">
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  // set once React has taken the page over (browser tests wait for it before using a form's checks)
  useEffect(() => {
    document.documentElement.dataset.hydrated = "yes";
  }, []);
  return <Outlet />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return (
    <main className="mx-auto max-w-3xl px-6 py-16">
      <ErrorPage error={error} />
    </main>
  );
}
