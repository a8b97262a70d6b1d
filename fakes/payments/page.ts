// The hosted payment page a session's `url` points at. Plain HTML, no script, no outside assets.
import { Router, urlencoded } from "express";
import { checkCard } from "./cards";
import type { StoredSession } from "./sessions";
import type { SessionStore } from "./store";

// A refused payment is still a page that rendered fine: answering 200 keeps browsers from logging
// a console error (which browser tests treat as a failure). Tests read the outcome from this header.
const OUTCOME = "X-Payment-Outcome";

const CSP = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; frame-ancestors 'none'";

export function pageRouter(store: SessionStore): Router {
  const router = Router();
  router.use(urlencoded({ extended: false, limit: "16kb" }));
  router.use((_req, res, next) => {
    res.set("Content-Security-Policy", CSP).set("Cache-Control", "no-store").set("X-Content-Type-Options", "nosniff");
    next();
  });

  router.get("/pay/:id", (req, res) => {
    const stored = store.find(req.params.id);
    if (!stored) return void res.status(404).type("html").send(notFoundPage());
    res.type("html").send(sessionPage(stored));
  });

  router.post("/pay/:id", (req, res) => {
    const stored = store.find(req.params.id);
    if (!stored) return void res.status(404).type("html").send(notFoundPage());
    if (stored.session.status !== "open") {
      return void res.set(OUTCOME, `session-${stored.session.status}`).type("html").send(sessionPage(stored));
    }

    const form = {
      number: field(req.body, "card_number"),
      expiry: field(req.body, "card_expiry"),
      cvc: field(req.body, "card_cvc"),
      name: field(req.body, "card_name"),
      email: field(req.body, "email"),
    };
    // Stripe asks for an e-mail address only when the session was not created with one.
    if (!stored.session.customer_email && !/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(form.email.trim())) {
      const error = { declined: false, field: "email" as const, message: "Your email address is incomplete or invalid." };
      return void res.set(OUTCOME, "invalid").type("html").send(sessionPage(stored, { form, error }));
    }
    const outcome = checkCard(form);
    if (!outcome.ok) {
      res.set(OUTCOME, outcome.declined ? "declined" : "invalid").type("html").send(sessionPage(stored, { form, error: outcome }));
      return;
    }
    store.markPaid(stored, { name: form.name.trim() || null, email: form.email.trim() || null });
    res.redirect(303, stored.session.success_url.replaceAll("{CHECKOUT_SESSION_ID}", stored.session.id));
  });
  return router;
}

function field(body: unknown, name: string): string {
  const value = (body as Record<string, unknown> | undefined)?.[name];
  return typeof value === "string" ? value.slice(0, 200) : "";
}

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

export function formatAmount(minor: number, currency: string): string {
  const code = currency.toUpperCase();
  const format = new Intl.NumberFormat("en-GB", { style: "currency", currency: code });
  const digits = format.resolvedOptions().maximumFractionDigits ?? 2;
  return format.format(minor / 10 ** digits);
}

interface FormState {
  form: { number: string; expiry: string; cvc: string; name: string; email: string };
  error: { field: "number" | "expiry" | "cvc" | "email"; message: string };
}

function sessionPage(stored: StoredSession, state?: FormState): string {
  const { session, lineItems } = stored;
  const total = formatAmount(session.amount_total, session.currency);
  const items = lineItems
    .map(
      (item) =>
        `<tr><td>${escapeHtml(item.description)}${item.quantity > 1 ? ` <span class="muted">× ${item.quantity}</span>` : ""}</td>` +
        `<td class="num">${escapeHtml(formatAmount(item.amount_total, item.currency))}</td></tr>`,
    )
    .join("");
  const summary = `<table class="items">${items}<tr class="total"><td>Total</td><td class="num">${escapeHtml(total)}</td></tr></table>`;

  let body: string;
  if (session.status === "complete") {
    body = `<p class="notice ok" role="status">This payment has been made. Thank you.</p>${returnLink(session.success_url.replaceAll("{CHECKOUT_SESSION_ID}", session.id), "Return to the site")}`;
  } else if (session.status === "expired") {
    body = `<p class="notice" role="status">This payment page has expired. Start the payment again from the site.</p>${session.cancel_url ? returnLink(session.cancel_url, "Return to the site") : ""}`;
  } else {
    body = cardForm(stored, total, state);
  }
  return layout(`Pay ${total}`, `${summary}${body}`, session.customer_email);
}

function returnLink(href: string, label: string): string {
  return `<p><a href="${escapeHtml(href)}">${escapeHtml(label)}</a></p>`;
}

function cardForm(stored: StoredSession, total: string, state?: FormState): string {
  const value = (name: keyof FormState["form"]) => escapeHtml(state?.form[name] ?? "");
  const invalid = (name: FormState["error"]["field"]) =>
    state?.error.field === name ? ' aria-invalid="true" aria-describedby="card-error"' : "";
  const error = state ? `<p class="notice error" id="card-error" role="alert">${escapeHtml(state.error.message)}</p>` : "";
  const cancel = stored.session.cancel_url
    ? `<a class="cancel" href="${escapeHtml(stored.session.cancel_url)}">Cancel and go back</a>`
    : "";
  return `${error}
<form method="post" action="/pay/${escapeHtml(stored.session.id)}" autocomplete="off" novalidate>
  ${stored.session.customer_email ? "" : `<label>Email<input name="email" type="email" value="${value("email")}"${invalid("email")} required></label>`}
  <label>Card number<input name="card_number" inputmode="numeric" placeholder="4242 4242 4242 4242" value="${value("number")}"${invalid("number")} required></label>
  <div class="row">
    <label>Expiry (MM / YY)<input name="card_expiry" inputmode="numeric" placeholder="12 / 34" value="${value("expiry")}"${invalid("expiry")} required></label>
    <label>CVC<input name="card_cvc" inputmode="numeric" placeholder="123"${invalid("cvc")} required></label>
  </div>
  <label>Name on card <span class="muted">(optional)</span><input name="card_name" value="${value("name")}"></label>
  <button type="submit">Pay ${escapeHtml(total)}</button>
  ${cancel}
</form>
<details class="cards"><summary>Test cards</summary>
  <p><code>4242 4242 4242 4242</code> is accepted; <code>4000 0000 0000 0002</code> is declined;
  <code>4000 0000 0000 9995</code> has insufficient funds. Any future expiry date and any three digits for the CVC.</p>
</details>`;
}

function notFoundPage(): string {
  return layout("Payment not found", `<p class="notice" role="status">There is no payment with this address. It may have been created before the payment service restarted.</p>`, null);
}

function layout(title: string, content: string, email: string | null): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<link rel="icon" href="data:,">
<title>${escapeHtml(title)} · test payment</title>
<style>
  :root { color-scheme: light; --ink: #1d2433; --muted: #5b6578; --line: #d8dde6; --accent: #2f4f8f; }
  * { box-sizing: border-box; }
  body { margin: 0; font: 16px/1.5 system-ui, sans-serif; color: var(--ink); background: #f3f5f8; }
  main { max-width: 28rem; margin: 3rem auto; padding: 2rem; background: #fff; border: 1px solid var(--line); border-radius: 10px; }
  .banner { margin: 0 0 1rem; font-size: .8rem; letter-spacing: .04em; text-transform: uppercase; color: #8a5a00; }
  h1 { margin: 0 0 1.25rem; font-size: 1.6rem; font-weight: 600; }
  .muted { color: var(--muted); font-size: .9em; }
  table.items { width: 100%; border-collapse: collapse; margin-bottom: 1.5rem; }
  .items td { padding: .4rem 0; border-bottom: 1px solid var(--line); }
  .items .num { text-align: right; white-space: nowrap; }
  .items .total td { font-weight: 600; border-bottom: 0; }
  label { display: block; margin-bottom: 1rem; font-size: .9rem; color: var(--muted); }
  input { display: block; width: 100%; margin-top: .25rem; padding: .6rem .7rem; font: inherit; color: var(--ink); border: 1px solid var(--line); border-radius: 6px; }
  input:focus { outline: 2px solid var(--accent); outline-offset: 1px; }
  input[aria-invalid="true"] { border-color: #b3261e; }
  .row { display: grid; grid-template-columns: 2fr 1fr; gap: 1rem; }
  button { width: 100%; padding: .75rem; font: inherit; font-weight: 600; color: #fff; background: var(--accent); border: 0; border-radius: 6px; cursor: pointer; }
  button:hover { background: #243e72; }
  .cancel { display: block; margin-top: 1rem; text-align: center; color: var(--muted); }
  .notice { padding: .75rem 1rem; border-radius: 6px; background: #eef1f6; }
  .notice.error { background: #fbeae9; color: #8c1d18; }
  .notice.ok { background: #e8f3ea; color: #1f5a2a; }
  .cards { margin-top: 1.5rem; font-size: .9rem; color: var(--muted); }
  code { font-size: .95em; }
</style>
</head>
<body>
<main>
  <p class="banner">Test mode · no real money moves</p>
  <h1>${escapeHtml(title)}</h1>
  ${email ? `<p class="muted">For ${escapeHtml(email)}</p>` : ""}
  ${content}
</main>
</body>
</html>
`;
}
