import { z } from "zod";
import { emailField } from "~/lib/email";

export const emailSchema = z.object({
  email: emailField("Enter your e-mail address."),
  redirectTo: z.string().optional(),
});

/** Sign-in codes use no look-alikes (no 0/O, 1/I/L) and are compared in upper case. */
export const CODE_ALPHABET = "ABCDEFGHJKMNPQRSTUVWXYZ23456789";

/** What a person types, as the code was made: upper case, without spaces or dashes. */
export function normaliseCode(typed: string) {
  return typed.replace(/[\s-]+/g, "").toUpperCase();
}

export const codeSchema = z.object({
  code: z
    .string()
    .trim()
    .min(1, "Enter the code from the e-mail.")
    // Typed in any case, with or without a space or dash in the middle; checked in upper case.
    .transform(normaliseCode)
    .pipe(z.string().regex(/^[A-Z0-9]{6}$/, "The code has 6 letters and digits.")),
});

export const profileSchema = z.object({
  name: z.string().trim().min(2, "Enter your name as it should appear on proposals.").max(200),
  institution: z.string().trim().min(2, "Enter your institution.").max(200),
});
