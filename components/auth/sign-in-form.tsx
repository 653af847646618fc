"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { buttonClass, Field, inputClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

export function SignInForm({ callbackUrl, failedMessage, initialError }: { callbackUrl: string; failedMessage: string; initialError?: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | undefined>(initialError);
  const [pending, setPending] = useState(false);

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    setPending(true);
    setError(undefined);
    const form = new FormData(event.currentTarget);
    const result = await signIn("credentials", {
      email: String(form.get("email") ?? ""),
      password: String(form.get("password") ?? ""),
      redirect: false,
    }).catch(() => undefined);
    if (result?.ok && !result.error) {
      router.replace(callbackUrl);
      router.refresh();
      return;
    }
    setPending(false);
    setError(result ? failedMessage : "The server could not be reached. Check your connection and try again.");
  }

  return (
    <form onSubmit={submit} className="space-y-5" noValidate>
      {error && <Notice tone="error">{error}</Notice>}
      <Field label="E-mail" name="email">
        <input id="email" name="email" type="email" autoComplete="username" required autoFocus className={inputClass} />
      </Field>
      <Field label="Password" name="password">
        <input id="password" name="password" type="password" autoComplete="current-password" required className={inputClass} />
      </Field>
      <button type="submit" disabled={pending} className={`${buttonClass} w-full`}>
        {pending ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
