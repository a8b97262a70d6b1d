// Per-request facts shared by entry.server's handleError and the root middleware.
import { createContext } from "react-router";

/** Set when a loader or action of this request failed because the database did not answer. */
export const databaseFailed = createContext<boolean>(false);

/** Internal headers the HTTP front (app/cli/http-app.ts) sets; a client's copies are dropped. */
export const NONCE_HEADER = "x-nightshare-csp-nonce";
export const BODY_TOO_LARGE_HEADER = "x-nightshare-body-too-large";
