// The status of each service behind `/healthz`, probed in the background and cached, so that
// the endpoint is cheap (no probe per call) and answers quickly even when a service hangs.
import { mailTransport } from "~/lib/mail/queue.server";
import { paymentServiceHealth } from "~/lib/payments/payments.server";
import { OutgoingMail } from "~/models/index.server";

export type ServiceName = "database" | "mail" | "payments";
export type ServiceStatus = "ok" | "fail";

/** A result younger than this is served as is. */
export const FRESH_MS = 5_000;
/** Older than this, a call waits for a new probe (at most PROBE_TIMEOUT_MS) instead. */
export const STALE_MS = 30_000;
/** A probe that has not answered by then counts as a failure (it may still finish later). */
export const PROBE_TIMEOUT_MS = 1_500;

interface Entry {
  status: ServiceStatus;
  checkedAt: number;
  detail: unknown;
  pendingMail?: number | null;
}

const probes: Record<ServiceName, () => Promise<Omit<Entry, "checkedAt">>> = {
  // One query that also yields the queue length: the database answers, the schema is there.
  database: async () => ({ status: "ok", detail: null, pendingMail: await OutgoingMail.count({ where: { status: "pending" } }) }),
  mail: async () => {
    await mailTransport().verify();
    return { status: "ok", detail: null };
  },
  payments: async () => {
    const result = await paymentServiceHealth();
    return result === "ok" ? { status: "ok", detail: null } : { status: "fail", detail: result };
  },
};

const cache = new Map<ServiceName, Entry>();
const inFlight = new Map<ServiceName, Promise<Entry>>();

function withTimeout<T>(promise: Promise<T>, ms: number): Promise<T> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`no answer within ${ms} ms`)), ms);
    timer.unref?.();
    promise.then(
      (v) => (clearTimeout(timer), resolve(v)),
      (e) => (clearTimeout(timer), reject(e)),
    );
  });
}

/** One probe per service at a time: a hanging service never piles up probes. */
function refresh(name: ServiceName): Promise<Entry> {
  const running = inFlight.get(name);
  if (running) return running;
  const started = probes[name]();
  const promise = withTimeout(started, PROBE_TIMEOUT_MS)
    .catch((error: unknown): Omit<Entry, "checkedAt"> => ({ status: "fail", detail: error }))
    .then((result) => {
      const entry: Entry = { ...result, checkedAt: Date.now() };
      const before = cache.get(name);
      // The raw error goes to the log (once per change), never into the answer.
      if (entry.status === "fail" && before?.status !== "fail") console.error(`[healthz] ${name} failed:`, entry.detail);
      if (entry.status === "ok" && before?.status === "fail") console.error(`[healthz] ${name} is back`);
      cache.set(name, entry);
      return entry;
    });
  inFlight.set(name, promise);
  // The slot frees when the probe itself settles, not at the timeout.
  void started.catch(() => undefined).finally(() => inFlight.delete(name));
  return promise;
}

async function current(name: ServiceName, now: number): Promise<Entry> {
  const entry = cache.get(name);
  if (entry && now - entry.checkedAt < FRESH_MS) return entry;
  const next = refresh(name);
  if (entry && now - entry.checkedAt < STALE_MS) return entry;
  // Nothing recent: wait for the probe, bounded, whatever the service does.
  return withTimeout(next, PROBE_TIMEOUT_MS + 100).catch(() => ({ status: "fail", checkedAt: now, detail: null }) as Entry);
}

export async function serviceHealth() {
  const now = Date.now();
  const [database, mail, payments] = await Promise.all([current("database", now), current("mail", now), current("payments", now)]);
  return {
    status: database.status === "ok" && mail.status === "ok" && payments.status === "ok" ? ("ok" as const) : ("degraded" as const),
    database: database.status,
    mail: { transport: mail.status, pending: database.status === "ok" ? (database.pendingMail ?? null) : null },
    payments: payments.status,
    checkedAt: new Date(Math.min(database.checkedAt, mail.checkedAt, payments.checkedAt)).toISOString(),
  };
}

/** Forgets cached results (tests). */
export function resetServiceHealth() {
  cache.clear();
}
