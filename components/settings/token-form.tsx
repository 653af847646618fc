"use client";

import { useActionState } from "react";
import { createTokenAction } from "@/app/(workspace)/settings/tokens/actions";
import { buttonClass, Field, inputClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

export function TokenForm() {
  const [state, action, pending] = useActionState(createTokenAction, {});
  const errors = state.fieldErrors ?? {};
  return (
    <form action={action} className="space-y-4" key={state.secret}>
      {state.error && <Notice tone="error">{state.error}</Notice>}
      {state.secret && (
        <div className="space-y-2">
          <Notice tone="ok">{state.ok}</Notice>
          <label htmlFor="new-token" className="block text-sm font-medium">
            Your new token
          </label>
          <input id="new-token" readOnly value={state.secret} className={`${inputClass} font-mono text-xs`} onFocus={(e) => e.currentTarget.select()} />
        </div>
      )}
      <Field label="Name" name="name" error={errors.name} hint="Say where it is used, e.g. “Scanner station, press 2”.">
        <input id="name" name="name" required maxLength={100} defaultValue={state.secret ? "" : state.values?.name} className={inputClass} />
      </Field>
      <Field label="Expires" name="expiresInDays" error={errors.expiresInDays}>
        <select id="expiresInDays" name="expiresInDays" defaultValue={state.values?.expiresInDays ?? "90"} className={inputClass}>
          <option value="7">In 7 days</option>
          <option value="30">In 30 days</option>
          <option value="90">In 90 days</option>
          <option value="365">In a year</option>
          <option value="">Never</option>
        </select>
      </Field>
      <button type="submit" disabled={pending} className={buttonClass}>
        {pending ? "Creating…" : "Create token"}
      </button>
    </form>
  );
}
