// The one e-mail rule: what counts as an address, and when two addresses are the same person's
// (trimmed, compared in lower case; stored that way). Browser-safe: the forms use it too.
import { z } from "zod";

/** The longest address SMTP carries (RFC 5321: a 254-character path). */
export const EMAIL_MAX_LENGTH = 254;

/** An address as it is stored and compared. */
export function normaliseEmail(address: string): string {
  return address.trim().toLowerCase();
}

export function sameEmail(a: string, b: string): boolean {
  return normaliseEmail(a) === normaliseEmail(b);
}

export const INVALID_EMAIL_MESSAGE = "Enter a valid e-mail address, like name@institute.example.";

/** A form field holding an e-mail address; `emptyMessage` when nothing was typed. The output is normalised. */
export function emailField(emptyMessage: string) {
  return z
    .string()
    .trim()
    .min(1, emptyMessage)
    .max(EMAIL_MAX_LENGTH, "That address is too long.")
    .pipe(z.email(INVALID_EMAIL_MESSAGE))
    .transform(normaliseEmail);
}
