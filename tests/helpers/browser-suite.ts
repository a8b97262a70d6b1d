import type { Browser } from "playwright-core";
import { afterAll, beforeAll } from "vitest";
import { listen } from "./app";
import { launchBrowser } from "./browser";
import { ensureDatabase } from "./db";
import { clearMail } from "./maildev";

/** For a browser test file: the app listening on the run's port, Chromium, an empty mail catcher. */
export function appInBrowser() {
  const suite = {} as { server: Awaited<ReturnType<typeof listen>>; browser: Browser };
  beforeAll(async () => {
    await ensureDatabase();
    await clearMail();
    suite.server = await listen();
    suite.browser = await launchBrowser();
  });
  afterAll(async () => {
    await suite.browser?.close();
    await suite.server?.close();
  });
  return suite;
}
