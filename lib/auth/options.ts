// next-auth v4 configuration: e-mail + password (Credentials), JWT sessions carrying the user's id, role and
// customer. The role in the token is only a hint for the UI; every request re-reads the user (lib/auth/session.ts).
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { env } from "../env";
import { verifyCredentials } from "./credentials";
import { clientAddress } from "./rate-limit";
import type { Role } from "./policy";

process.env.NEXTAUTH_URL ??= env.APP_URL;

export const SESSION_MAX_AGE_SECONDS = 12 * 60 * 60;

export const authOptions: NextAuthOptions = {
  secret: env.NEXTAUTH_SECRET,
  session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_SECONDS },
  pages: { signIn: "/sign-in", error: "/sign-in" },
  providers: [
    CredentialsProvider({
      name: "E-mail and password",
      credentials: {
        email: { label: "E-mail", type: "email" },
        password: { label: "Password", type: "password" },
      },
      async authorize(credentials, request) {
        const actor = await verifyCredentials(credentials, clientAddress(new Headers(request?.headers as Record<string, string> | undefined)));
        if (!actor) return null;
        return { id: String(actor.id), name: actor.name, email: actor.email, role: actor.role, customerId: actor.customerId };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = user.role;
        token.customerId = user.customerId;
      }
      return token;
    },
    async session({ session, token }) {
      session.user = {
        id: token.uid,
        role: token.role,
        customerId: token.customerId,
        name: token.name ?? "",
        email: token.email ?? "",
      };
      return session;
    },
  },
};

declare module "next-auth" {
  interface User {
    role: Role;
    customerId: number | null;
  }
  interface Session {
    user: { id: number; role: Role; customerId: number | null; name: string; email: string };
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    uid: number;
    role: Role;
    customerId: number | null;
  }
}
