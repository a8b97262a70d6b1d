import { randomBytes } from "node:crypto";

const ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";

/** A Stripe-looking identifier: `prefix` + random base-62 characters, e.g. `cs_test_a1B2…`. */
export function newId(prefix: string, length = 24): string {
  const bytes = randomBytes(length);
  let out = "";
  for (const byte of bytes) out += ALPHABET[byte % ALPHABET.length];
  return prefix + out;
}

export function unixNow(): number {
  return Math.floor(Date.now() / 1000);
}
