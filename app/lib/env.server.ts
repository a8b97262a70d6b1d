import { parseEnv } from "./env";

export type { Env } from "./env";
export { parseEnv } from "./env";

/** The validated environment of this process (the schema itself is pure, in `env.ts`). */
export const env = parseEnv(process.env);
