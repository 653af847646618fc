// next-auth's endpoints. A sign-in attempt from an account or address that used up its allowance of failures is
// answered 429 with Retry-After before next-auth sees it (lib/auth/rate-limit.ts); the count itself is kept by
// verifyCredentials, which refuses such attempts too.
import NextAuth from "next-auth";
import { normaliseEmail } from "@/lib/auth/credentials";
import { authOptions } from "@/lib/auth/options";
import { clientAddress, retryAfter } from "@/lib/auth/rate-limit";
import { errorResponse, tooManyAttempts } from "@/lib/errors";

const handler = NextAuth(authOptions);

type Context = { params: Promise<{ nextauth: string[] }> };

async function POST(request: Request, ctx: Context) {
  const { nextauth } = await ctx.params;
  if (nextauth.join("/") === "callback/credentials") {
    const form = await request
      .clone()
      .formData()
      .catch(() => null);
    const email = form?.get("email");
    const wait = await retryAfter("sign-in", {
      address: clientAddress(request.headers),
      account: typeof email === "string" ? normaliseEmail(email) : undefined,
    });
    if (wait) return errorResponse(tooManyAttempts(wait));
  }
  return handler(request, ctx);
}

export { handler as GET, POST };
