import { existsSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../..");

/**
 * For the local `npm start` / `npm run dev` / tests only: values already in the environment win;
 * then `.env`; then the committed local defaults. The production entry (`serve.ts`) never calls it.
 */
export function loadEnvFiles() {
  for (const name of [".env", ".env.example"]) {
    const file = path.join(root, name);
    if (existsSync(file)) process.loadEnvFile(file);
  }
}
