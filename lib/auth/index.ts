import "server-only";
import NextAuth, { CredentialsSignin, type DefaultSession } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import { z } from "zod";
import { db } from "@/db/client";
import { verifyCredentials } from "./credentials";
import { listMembershipsOfUser } from "./memberships";
import type { MemberRole } from "@/db/schema";

declare module "next-auth" {
  interface Session {
    user: { id: string; labs: { id: string; slug: string; name: string; role: MemberRole }[] } & DefaultSession["user"];
  }
}

class Throttled extends CredentialsSignin {
  code = "throttled";
}

const credentials = z.object({ email: z.string().email(), password: z.string().min(1).max(200) });

/**
 * Sign-in with e-mail and password, JWT sessions. The token carries only the user id; the session
 * callback reads the user's labs and roles from the database on every request, so a role change
 * takes effect at once. Authorisation itself happens in the services (`lib/auth/actor.ts`).
 */
export const { handlers, auth, signIn, signOut } = NextAuth({
  trustHost: true,
  secret: process.env.AUTH_SECRET,
  session: { strategy: "jwt", maxAge: 14 * 24 * 3600 },
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
        const clientKey = request?.headers?.get("x-forwarded-for")?.split(",")[0]?.trim() || undefined;
        const result = await verifyCredentials({ db: db(), input: { ...parsed.data, clientKey } });
        if (!result.ok) {
          if (result.reason === "throttled") throw new Throttled();
          return null;
        }
        return result.user;
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user?.id) token.sub = user.id;
      return token;
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
