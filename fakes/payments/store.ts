// In-memory state of the fake. Restarting the fake loses every session and event:
// the app's own database is the record, and it re-fetches sessions it still cares about.
import { ApiError, noSuch } from "./errors";
import { newId, unixNow } from "./ids";
import { buildSession, type CheckoutSession, type StoredSession } from "./sessions";
import type { WebhookSender } from "./webhooks";

export class SessionStore {
  readonly #sessions = new Map<string, StoredSession>();
  readonly #sender: WebhookSender;

  constructor(sender: WebhookSender) {
    this.#sender = sender;
  }

  create(params: Record<string, unknown>, payBaseUrl: string): StoredSession {
    const stored = buildSession(params, payBaseUrl);
    this.#sessions.set(stored.session.id, stored);
    return stored;
  }

  /** Looks a session up, expiring it first if its time has passed. */
  find(id: string): StoredSession | undefined {
    const stored = this.#sessions.get(id);
    if (stored && stored.session.status === "open" && unixNow() >= stored.session.expires_at) {
      this.#markExpired(stored);
    }
    return stored;
  }

  get(id: string): StoredSession {
    const stored = this.find(id);
    if (!stored) throw noSuch("checkout.session", id, "session");
    return stored;
  }

  /** Newest first, as Stripe lists. */
  list(): StoredSession[] {
    return [...this.#sessions.keys()].reverse().map((id) => this.get(id));
  }

  expire(id: string): CheckoutSession {
    const stored = this.get(id);
    if (stored.session.status !== "open") {
      throw new ApiError(
        400,
        "invalid_request_error",
        `Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of "${stored.session.status}".`,
        { code: "checkout_session_not_open" },
      );
    }
    this.#markExpired(stored);
    return stored.session;
  }

  markPaid(stored: StoredSession, details: { name: string | null; email: string | null }): void {
    const session = stored.session;
    session.status = "complete";
    session.payment_status = "paid";
    session.payment_intent = newId("pi_", 24);
    session.customer_details = { email: session.customer_email ?? details.email, name: details.name };
    session.url = null;
    this.#sender.emit("checkout.session.completed", structuredClone(session));
  }

  sweepExpired(): void {
    for (const id of this.#sessions.keys()) this.find(id);
  }

  #markExpired(stored: StoredSession): void {
    stored.session.status = "expired";
    stored.session.url = null;
    this.#sender.emit("checkout.session.expired", structuredClone(stored.session));
  }
}
