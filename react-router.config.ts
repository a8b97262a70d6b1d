import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // The test run builds into its own folder so that it never disturbs a running `npm start`.
  buildDirectory: process.env.NIGHTSHARE_BUILD_DIR ?? "build",
  future: {
    v8_middleware: true,
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
    v8_passThroughRequests: true,
    v8_trailingSlashAwareDataRequests: true,
  },
} satisfies Config;
