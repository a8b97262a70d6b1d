// Signed event delivery. The signature is the one Stripe documents and the SDK's
// `webhooks.constructEvent` checks: `Stripe-Signature: t=<unix>,v1=<hex HMAC-SHA256(secret, "<t>.<body>")>`.
import { createHmac } from "node:crypto";
import Stripe from "stripe";
import { newId, unixNow } from "./ids";

export interface WebhookEvent {
  id: string;
  object: "event";
  api_version: string;
  created: number;
  data: { object: unknown };
  livemode: false;
  pending_webhooks: number;
  request: { id: string | null; idempotency_key: string | null };
  type: string;
}

export interface DeliveryAttempt {
  at: number;
  run: number;
  status?: number;
  error?: string;
}

export interface EventRecord {
  event: WebhookEvent;
  /** The exact body sent, serialised once so that every delivery of an event is byte-identical. */
  payload: string;
  attempts: DeliveryAttempt[];
  delivered: boolean;
}

export interface WebhookSenderOptions {
  url?: string;
  secret: string;
  /** Pauses between attempts of one delivery; attempts = this length + 1. */
  retryDelaysMs: number[];
  attemptTimeoutMs?: number;
  log?: (line: string) => void;
}

export function signatureHeader(secret: string, payload: string, timestamp = unixNow()): string {
  const v1 = createHmac("sha256", secret).update(`${timestamp}.${payload}`, "utf8").digest("hex");
  return `t=${timestamp},v1=${v1}`;
}

export class WebhookSender {
  readonly #options: WebhookSenderOptions;
  readonly #records = new Map<string, EventRecord>();
  readonly #timers = new Set<NodeJS.Timeout>();
  readonly #inFlight = new Set<AbortController>();
  #runs = 0;
  #closed = false;

  constructor(options: WebhookSenderOptions) {
    this.#options = options;
  }

  /** Records the event (a snapshot of `object` as it is now) and starts delivering it. */
  emit(type: string, object: unknown): EventRecord {
    const event: WebhookEvent = {
      id: newId("evt_", 24),
      object: "event",
      api_version: Stripe.API_VERSION,
      created: unixNow(),
      data: { object },
      livemode: false,
      pending_webhooks: this.#options.url ? 1 : 0,
      request: { id: null, idempotency_key: null },
      type,
    };
    const record: EventRecord = { event, payload: JSON.stringify(event, null, 2), attempts: [], delivered: false };
    this.#records.set(event.id, record);
    this.#deliver(record);
    return record;
  }

  /** Sends an event again, same id and body, as Stripe's "resend" does. */
  resend(id: string): EventRecord | undefined {
    const record = this.#records.get(id);
    if (record) this.#deliver(record);
    return record;
  }

  get(id: string): EventRecord | undefined {
    return this.#records.get(id);
  }

  list(): EventRecord[] {
    return [...this.#records.values()];
  }

  close(): void {
    this.#closed = true;
    for (const timer of this.#timers) clearTimeout(timer);
    this.#timers.clear();
    for (const controller of this.#inFlight) controller.abort();
  }

  #deliver(record: EventRecord): void {
    const url = this.#options.url;
    if (!url || this.#closed) return;
    const run = ++this.#runs;
    const attempt = async (n: number): Promise<void> => {
      if (this.#closed) return;
      const controller = new AbortController();
      this.#inFlight.add(controller);
      const timeout = setTimeout(() => controller.abort(), this.#options.attemptTimeoutMs ?? 10_000);
      const entry: DeliveryAttempt = { at: unixNow(), run };
      try {
        const response = await fetch(url, {
          method: "POST",
          headers: {
            "content-type": "application/json; charset=utf-8",
            "user-agent": "Nightshare-PaymentFake/1.0 (+webhooks)",
            // Signed at send time: a retry carries a fresh timestamp, like Stripe's.
            "stripe-signature": signatureHeader(this.#options.secret, record.payload),
          },
          body: record.payload,
          signal: controller.signal,
        });
        entry.status = response.status;
        await response.arrayBuffer().catch(() => undefined);
      } catch (error) {
        entry.error = error instanceof Error ? (error.cause instanceof Error ? error.cause.message : error.message) : String(error);
      } finally {
        clearTimeout(timeout);
        this.#inFlight.delete(controller);
      }
      if (this.#closed) return;
      record.attempts.push(entry);
      const outcome = entry.status !== undefined ? `HTTP ${entry.status}` : `failed (${entry.error})`;
      const of = `attempt ${n + 1}/${this.#options.retryDelaysMs.length + 1}`;
      this.#options.log?.(`webhook ${record.event.type} ${record.event.id} → ${outcome}, ${of}`);
      if (entry.status !== undefined && entry.status >= 200 && entry.status < 300) {
        record.delivered = true;
        return;
      }
      const delay = this.#options.retryDelaysMs[n];
      if (delay === undefined) return;
      const timer = setTimeout(() => {
        this.#timers.delete(timer);
        void attempt(n + 1);
      }, delay);
      this.#timers.add(timer);
    };
    void attempt(0);
  }
}
