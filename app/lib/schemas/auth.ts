import { z } from "zod";

export const emailSchema = z.object({
  email: z
    .string()
    .trim()
    .min(1, "Enter your e-mail address.")
    .max(254, "That address is too long.")
    .pipe(z.email("Enter a valid e-mail address, like name@institute.example.")),
  redirectTo: z.string().optional(),
});

export const codeSchema = z.object({
  code: z
    .string()
    .trim()
    .min(1, "Enter the code from the e-mail.")
    .regex(/^[A-Za-z0-9]{6}$/, "The code has 6 letters and digits."),
});

export const profileSchema = z.object({
  name: z.string().trim().min(2, "Enter your name as it should appear on proposals.").max(200),
  institution: z.string().trim().min(2, "Enter your institution.").max(200),
});
