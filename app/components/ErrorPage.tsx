import { isRouteErrorResponse, Link } from "react-router";

const messages: Record<number, { title: string; text: string }> = {
  400: { title: "That request was not understood", text: "Something in it was missing or malformed." },
  401: { title: "Sign in first", text: "This page needs you to be signed in." },
  403: { title: "Not for your account", text: "Your account does not hold the role this page needs." },
  404: { title: "Nothing here", text: "There is no page at this address. It may have moved, or the link is mistyped." },
  409: { title: "Changed meanwhile", text: "Someone else saved a newer version first." },
  413: { title: "Too much at once", text: "What was sent is larger than this page takes. Nothing was saved; send less, or a smaller file." },
  429: { title: "Slow down a little", text: "Too many requests in a short time. Try again in a minute." },
  503: { title: "Not available for a moment", text: "A service the portal needs is not answering. Try again in a few seconds; nothing you saved before is lost." },
};

/** One error page for every boundary: a clear message per status, a stack only in development. */
export function ErrorPage({ error }: { error: unknown }) {
  let status = 500;
  let detail: string | undefined;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    detail = typeof error.data === "string" ? error.data : error.data?.message;
  }
  const known = messages[status] ?? {
    title: "Something went wrong on our side",
    text: "The error has been logged. Try again; if it keeps happening, tell the observatory office.",
  };
  const stack = import.meta.env.DEV && error instanceof Error ? error.stack : undefined;
  return (
    <section className="card" role="alert">
      <p className="text-sm font-semibold tracking-wide text-dusk-500 uppercase">Error {status}</p>
      <h1 className="mt-1">{known.title}</h1>
      <p className="mt-3 text-slate-700">{detail ?? known.text}</p>
      <p className="mt-6">
        <Link to="/" className="btn">Back to the start page</Link>
      </p>
      {stack ? <pre className="mt-6 overflow-auto rounded bg-slate-900 p-4 text-xs text-slate-100">{stack}</pre> : null}
    </section>
  );
}
