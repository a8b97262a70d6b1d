// `npm start` rebuilds only when needed: after a build it writes build/.source-stamp with the
// newest modification time and the number of the files the build reads (app/, public/, the
// config files); the next start skips `react-router build` when neither changed.
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../..");
const stampFile = () => path.join(root, "build", ".source-stamp");
const CONFIG = ["package.json", "package-lock.json", "react-router.config.ts", "vite.config.ts", "tsconfig.json"];

export function sourceState(dir = root): { newestMs: number; files: number } {
  let newestMs = 0;
  let files = 0;
  const visit = (p: string) => {
    const st = statSync(p, { throwIfNoEntry: false });
    if (!st) return;
    if (st.isDirectory()) {
      for (const name of readdirSync(p)) visit(path.join(p, name));
      newestMs = Math.max(newestMs, st.mtimeMs); // a deleted or renamed file changes its folder
      return;
    }
    files++;
    newestMs = Math.max(newestMs, st.mtimeMs);
  };
  for (const p of ["app", "public", ...CONFIG]) visit(path.join(dir, p));
  return { newestMs, files };
}

export function buildIsFresh() {
  if (!existsSync(path.join(root, "build/server/index.js")) || !existsSync(stampFile())) return false;
  try {
    const stamp = JSON.parse(readFileSync(stampFile(), "utf8")) as { newestMs: number; files: number };
    const now = sourceState();
    return now.files === stamp.files && now.newestMs <= stamp.newestMs;
  } catch {
    return false;
  }
}

/** After a successful build, with the sources as they were when it began (a save during the build rebuilds next time). */
export function writeBuildStamp(before: { newestMs: number; files: number }) {
  writeFileSync(stampFile(), JSON.stringify(before));
}
