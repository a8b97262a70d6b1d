// The environment's schema, pure: importing this module reads nothing. `env.server.ts` applies it
// to process.env; the production entry (`app/cli/serve.ts`) also refuses the example secrets.
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
    const lines = result.error.issues.map((issue) => `  ${issue.path.join(".")}: ${issue.message}`);
    throw new Error(`Nightshare cannot start: environment variables missing or malformed:\n${lines.join("\n")}`);
  }
  return result.data;
}

/**
 * The secrets committed in `.env.example` (a unit test keeps this list equal to the file). Anyone
 * can read them, so a production start with one of them is refused.
 */
export const EXAMPLE_SECRETS = {
  SESSION_SECRET: "local-session-secret-change-me-0123456789abcdef",
  TOTP_SECRET: "6f1c0e2d9a8b7c6d5e4f30211f2e3d4c5b6a79880f1e2d3c4b5a69788796a5b4",
  STRIPE_SECRET_KEY: "sk_test_nightshare_local",
  STRIPE_WEBHOOK_SECRET: "whsec_nightshare_local",
} as const;

/** Names of the variables that still hold a published example value (empty when none does). */
export function exampleSecretsIn(source: Record<string, string | undefined>): (keyof typeof EXAMPLE_SECRETS)[] {
  return (Object.keys(EXAMPLE_SECRETS) as (keyof typeof EXAMPLE_SECRETS)[]).filter(
    (name) => source[name]?.trim().toLowerCase() === EXAMPLE_SECRETS[name].toLowerCase(),
  );
}

/** parseEnv, and in production also no example secret. */
export function parseProductionEnv(source: Record<string, string | undefined>): Env {
  const env = parseEnv(source);
  if (env.NODE_ENV === "production") {
    const found = exampleSecretsIn(source);
    if (found.length) {
      throw new Error(
        `Nightshare refuses to start in production with the example value of ${found.join(", ")} from .env.example ` +
          `(published with the source). Set ${found.length === 1 ? "it" : "them"} to a new secret value.`,
      );
    }
  }
  return env;
}
