import { z } from "zod";
import { parseTrustProxy } from "./http/front-rules";

const port = z.coerce.number().int().min(1).max(65535);

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("production"),
  APP_URL: z.url(),
  DATABASE_HOST: z.string().min(1),
  DATABASE_PORT: port,
  DATABASE_NAME: z.string().min(1),
  DATABASE_USER: z.string().min(1),
  DATABASE_PASSWORD: z.string().min(1),
  SESSION_SECRET: z.string().min(32, "must be at least 32 characters"),
  TOTP_SECRET: z.string().regex(/^[0-9a-fA-F]{64}$/, "must be 64 hexadecimal characters"),
  SMTP_HOST: z.string().min(1),
  SMTP_PORT: port,
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().min(3),
  MAIL_WORKER: z.enum(["on", "off"]).default("on"),
  STRIPE_SECRET_KEY: z.string().startsWith("sk_", "must start with sk_"),
  STRIPE_WEBHOOK_SECRET: z.string().startsWith("whsec_", "must start with whsec_"),
  STRIPE_API_HOST: z.string().optional(),
  STRIPE_API_PORT: port.optional(),
  STRIPE_API_PROTOCOL: z.enum(["http", "https"]).default("https"),
  // The number of reverse-proxy hops in front of the app, or their addresses/CIDR ranges.
  TRUST_PROXY: z
    .string()
    .optional()
    .transform((value, ctx) => {
      const parsed = parseTrustProxy(value);
      if (parsed.ok) return parsed.value;
      ctx.addIssue({ code: "custom", message: parsed.message });
      return z.NEVER;
    }),
});

export type Env = z.infer<typeof schema>;

export function parseEnv(source: Record<string, string | undefined>): Env {
  const result = schema.safeParse(source);
  if (!result.success) {
    const lines = result.error.issues.map(
      (issue) => `  ${issue.path.join(".")}: ${issue.message}`,
    );
    throw new Error(`Nightshare cannot start: environment variables missing or malformed:\n${lines.join("\n")}`);
  }
  return result.data;
}

export const env = parseEnv(process.env);
