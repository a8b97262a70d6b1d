import { createCookieSessionStorage } from "react-router";
import { env } from "./env.server";

export interface SessionData {
  userId: number;
  redirectTo: string;
}
export interface SessionFlash {
  flash: string;
}

export const sessionStorage = createCookieSessionStorage<SessionData, SessionFlash>({
  cookie: {
    name: "__nightshare",
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    // Secure whenever the app is served over https (production); plain http only on loopback.
    secure: env.APP_URL.startsWith("https:"),
    secrets: [env.SESSION_SECRET],
    maxAge: 60 * 60 * 24 * 14,
  },
});

export function getSession(request: Request) {
  return sessionStorage.getSession(request.headers.get("Cookie"));
}
