import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { AuthCard } from "@/components/auth/auth-card";
import { SignInForm } from "@/components/auth/sign-in-form";
import { Notice } from "@/components/ui/notice";
import { SIGN_IN_FAILED_MESSAGE } from "@/lib/auth/credentials";
import { getActor } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Sign in" };

/** Only same-site paths are followed after sign-in. */
function safeCallback(value: string | string[] | undefined): string {
  const path = Array.isArray(value) ? value[0] : value;
  if (!path) return "/";
  try {
    const url = new URL(path, "http://local.invalid");
    return url.origin === "http://local.invalid" ? `${url.pathname}${url.search}` : "/";
  } catch {
    return "/";
  }
}

export default async function SignInPage(props: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const searchParams = await props.searchParams;
  const callbackUrl = safeCallback(searchParams.callbackUrl);
  if (await getActor()) redirect(callbackUrl);
  const failed = searchParams.error ? SIGN_IN_FAILED_MESSAGE : undefined;
  return (
    <AuthCard title="Sign in" intro="Press-sheet inspection against approved artwork.">
      {searchParams.password === "set" && (
        <div className="mb-5">
          <Notice tone="ok">Your password is set. Sign in with it now.</Notice>
        </div>
      )}
      <SignInForm callbackUrl={callbackUrl} failedMessage={SIGN_IN_FAILED_MESSAGE} initialError={failed} />
      <p className="mt-6 text-xs text-ink-muted">No account yet? An administrator at your printer sends you an invitation.</p>
    </AuthCard>
  );
}
