import type { Metadata } from "next";
import Link from "next/link";
import { AuthCard } from "@/components/auth/auth-card";
import { SetPasswordForm } from "@/components/auth/set-password-form";
import { Notice } from "@/components/ui/notice";
import { MIN_PASSWORD_LENGTH } from "@/lib/auth/password";
import { findOpenInvite } from "@/lib/users/invites";

export const metadata: Metadata = { title: "Choose a password" };

export default async function SetPasswordPage(props: { params: Promise<{ token: string }> }) {
  const { token } = await props.params;
  const invite = await findOpenInvite(token);
  if (!invite) {
    return (
      <AuthCard title="This link no longer works">
        <Notice tone="error">The link has expired or was already used. Ask an administrator to send you a new invitation.</Notice>
        <Link href="/sign-in" className="mt-6 inline-block text-sm font-medium text-accent hover:underline">
          Go to sign-in
        </Link>
      </AuthCard>
    );
  }
  return (
    <AuthCard title={`Welcome, ${invite.name}`} intro={`Choose the password for ${invite.email}.`}>
      <SetPasswordForm token={token} email={invite.email} minLength={MIN_PASSWORD_LENGTH} />
    </AuthCard>
  );
}
