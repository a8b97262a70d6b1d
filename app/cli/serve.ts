// `npm run serve`: the production entry. It serves the built app (`npm run build` first) against
// the services named by the environment. It reads no .env file (never .env.example), starts no
// database or fake, runs no migration, and refuses to start with a missing or malformed variable
// or with a secret published in .env.example — naming the variable, exit code 1.
import { parseProductionEnv } from "../lib/env";

if (process.env.NODE_ENV && process.env.NODE_ENV !== "production") {
  console.error(`[serve] NODE_ENV is "${process.env.NODE_ENV}": npm run serve is the production entry (leave NODE_ENV unset or "production"; use npm start locally).`);
  process.exit(1);
}
process.env.NODE_ENV = "production";
try {
  parseProductionEnv(process.env);
} catch (error) {
  console.error(`[serve] ${error instanceof Error ? error.message : error}`);
  process.exit(1);
}
const { serveBuild } = await import("./listen");
await serveBuild();
