"use client";

import { useActionState } from "react";
import { setPasswordAction } from "@/app/set-password/[token]/actions";
import { buttonClass, Field, inputClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

export function SetPasswordForm({ token, email, minLength }: { token: string; email: string; minLength: number }) {
  const [state, action, pending] = useActionState(setPasswordAction, {});
  return (
    <form action={action} className="space-y-5">
      {state.error && <Notice tone="error">{state.error}</Notice>}
      <input type="hidden" name="token" value={token} />
      <input type="email" name="email" value={email} autoComplete="username" readOnly hidden />
      <Field label="New password" name="password" error={state.fieldErrors?.password} hint={`At least ${minLength} characters.`}>
        <input id="password" name="password" type="password" autoComplete="new-password" required minLength={minLength} className={inputClass} />
      </Field>
      <Field label="Repeat the password" name="repeat" error={state.fieldErrors?.repeat}>
        <input id="repeat" name="repeat" type="password" autoComplete="new-password" required className={inputClass} />
      </Field>
      <button type="submit" disabled={pending} className={`${buttonClass} w-full`}>
        {pending ? "Saving…" : "Set password"}
      </button>
    </form>
  );
}
