import { existsSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../..");

/** Values already in the environment win; then `.env`; then the committed local defaults. */
export function loadEnvFiles() {
  for (const name of [".env", ".env.example"]) {
    const file = path.join(root, name);
    if (existsSync(file)) process.loadEnvFile(file);
  }
}
