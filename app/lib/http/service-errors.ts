// Recognises "the database is not answering" among thrown errors, so that a request which hit
// one answers 503 with Retry-After (JSON on the API, the error page elsewhere) instead of a 500.
// By name and code, not by class: the server build and the HTTP front may hold different copies.

const CONNECTION_ERROR_NAMES = new Set([
  "SequelizeConnectionError",
  "SequelizeConnectionRefusedError",
  "SequelizeConnectionAcquireTimeoutError",
  "SequelizeConnectionTimedOutError",
  "SequelizeHostNotFoundError",
  "SequelizeHostNotReachableError",
  "SequelizeInvalidConnectionError",
  "SequelizeTimeoutError",
]);

// mariadb connector and server codes that mean "unavailable or too slow", not "bad query".
const UNAVAILABLE_CODES = new Set([
  "ER_SOCKET_TIMEOUT",
  "ER_CONNECTION_TIMEOUT",
  "ER_GET_CONNECTION_TIMEOUT",
  "ER_CONNECTION_ALREADY_CLOSED",
  "ER_SOCKET_UNEXPECTED_CLOSE",
  "ER_CLOSING_POOL",
  "ER_STATEMENT_TIMEOUT",
  "ER_LOCK_WAIT_TIMEOUT",
  "ER_SERVER_SHUTDOWN",
  "ECONNREFUSED",
  "ECONNRESET",
  "EPIPE",
  "ETIMEDOUT",
]);

export const RETRY_AFTER_SECONDS = 5;

export function isDatabaseUnavailable(error: unknown, depth = 0): boolean {
  if (!error || typeof error !== "object" || depth > 4) return false;
  const e = error as { name?: unknown; code?: unknown; parent?: unknown; original?: unknown; cause?: unknown; error?: unknown };
  if (typeof e.name === "string" && CONNECTION_ERROR_NAMES.has(e.name)) return true;
  if (typeof e.code === "string" && UNAVAILABLE_CODES.has(e.code)) return true;
  return [e.parent, e.original, e.cause, e.error].some((inner) => inner !== error && isDatabaseUnavailable(inner, depth + 1));
}

export const DATABASE_UNAVAILABLE_MESSAGE =
  "The database is not answering at the moment, so nothing could be read or saved. Try again in a few seconds; nothing you saved before is lost.";
