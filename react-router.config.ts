import type { Config } from "@react-router/dev/config";
import { bundleNodeEntries } from "./app/cli/node-bundles";

export default {
  ssr: true,
  // The test run builds into its own folder so that it never disturbs a running `npm start`.
  buildDirectory: process.env.NIGHTSHARE_BUILD_DIR ?? "build",
  // then serve.ts and the worker threads as plain JavaScript, so that production needs no tsx
  buildEnd: ({ reactRouterConfig }) => bundleNodeEntries(reactRouterConfig),
  future: {
    v8_middleware: true,
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
    v8_passThroughRequests: true,
    v8_trailingSlashAwareDataRequests: true,
  },
} satisfies Config;
