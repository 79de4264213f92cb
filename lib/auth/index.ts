import "server-only";
import NextAuth, { CredentialsSignin, type DefaultSession } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import { cookies } from "next/headers";
import { z } from "zod";
import { db } from "@/db/client";
import { env } from "@/lib/env";
import { clientOf } from "./client";
import { verifyCredentials } from "./credentials";
import { cookieFrom, DEVICE_MAX_AGE_S, deviceCookieName, deviceOf, newDeviceCookie } from "./device";
import { listMembershipsOfUser } from "./memberships";
import { endSession, SESSION_MAX_AGE_S, sessionIsLive, startSession } from "./sessions";
import type { MemberRole } from "@/db/schema";

declare module "next-auth" {
  interface Session {
    user: { id: string; labs: { id: string; slug: string; name: string; role: MemberRole }[] } & DefaultSession["user"];
  }
}

class Throttled extends CredentialsSignin {
  code = "throttled";
  constructor(readonly retryAfterSeconds: number) {
    super();
  }
}

/** After a successful sign-in, the browser's device cookie for the account (`device.ts`); a genuine one is kept. */
async function rememberDevice(email: string, had: string | undefined) {
  if (had && deviceOf(had, email)) return;
  try {
    (await cookies()).set(deviceCookieName(email), newDeviceCookie(email), {
      httpOnly: true,
      sameSite: "lax",
      path: "/",
      secure: env().APP_URL.startsWith("https:"),
      maxAge: DEVICE_MAX_AGE_S,
    });
  } catch {
    // Outside a request that can set cookies: the next sign-in there is treated as a new browser.
  }
}

const credentials = z.object({ email: z.string().email(), password: z.string().min(1).max(200) });

/**
 * Sign-in with e-mail and password, JWT sessions. The token carries the user id and the id of its
 * session row (`sessions.ts`), checked on every request, so a session ended on the server (signing
 * out, removal from a lab) is refused wherever a copy of its cookie went; the session callback
 * reads the user's labs and roles from the database on every request, so a role change takes
 * effect at once. Authorisation itself happens in the services (`lib/auth/actor.ts`).
 */
export const { handlers, auth, signIn, signOut } = NextAuth({
  trustHost: true,
  secret: process.env.AUTH_SECRET,
  session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: "/sign-in" },
  logger: {
    // A wrong password is an ordinary event, not a stack trace in the server log.
    error(error) {
      if (error instanceof CredentialsSignin || (error as { type?: string }).type === "CredentialsSignin") return;
      console.error(`[auth] ${error.name}: ${error.message}`);
    },
    warn() {},
  },
  providers: [
    Credentials({
      credentials: { email: {}, password: {} },
      async authorize(raw, request) {
        const parsed = credentials.safeParse(raw);
        if (!parsed.success) return null;
        const headers = request.headers;
        const client = clientOf(headers, env().BANDCROSS_TRUSTED_PROXIES);
        const device = cookieFrom(headers.get("cookie"), deviceCookieName(parsed.data.email));
        const result = await verifyCredentials({ db: db(), input: { ...parsed.data, client, device } });
        if (!result.ok) {
          if (result.reason === "throttled") throw new Throttled(result.retryAfterSeconds);
          return null;
        }
        await rememberDevice(parsed.data.email, device);
        return result.user;
      },
    }),
  ],
  events: {
    async signOut(message) {
      if ("token" in message && message.token) await endSession(db(), message.token.sid, "signed out");
    },
  },
  callbacks: {
    async jwt({ token, user }) {
      if (user?.id) {
        token.sub = user.id;
        token.sid = await startSession(db(), user.id);
        return token;
      }
      // A session ended on the server, or a cookie from before sessions had ids: no session.
      return (await sessionIsLive(db(), token.sid, token.sub)) ? token : null;
    },
    async session({ session, token }) {
      const userId = token.sub;
      if (!userId) return session;
      const labs = await listMembershipsOfUser({ db: db(), userId });
      session.user = { ...session.user, id: userId, labs };
      return session;
    },
  },
});
