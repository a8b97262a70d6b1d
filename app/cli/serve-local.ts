// The app process of `npm start` (local demo): it may use the committed .env.example values,
// which `npm run serve` (production) refuses.
import { loadEnvFiles } from "./load-env";

loadEnvFiles();
process.env.NODE_ENV ??= "production";
const { serveBuild } = await import("./listen");
await serveBuild();
