"use client";

import { useActionState, useState } from "react";
import { inviteAction } from "@/app/(workspace)/admin/users/actions";
import { buttonClass, Field, inputClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { CustomerOptions, RoleOptions } from "@/components/admin/select-options";
import type { Role } from "@/lib/auth/policy";

export function InviteForm({ customers, validForHours }: { customers: { id: number; name: string }[]; validForHours: number }) {
  const [state, action, pending] = useActionState(inviteAction, {});
  const [role, setRole] = useState<Role>((state.values?.role as Role) ?? "reviewer");
  const errors = state.fieldErrors ?? {};
  return (
    <form action={action} className="space-y-4" key={state.ok}>
      {state.ok && <Notice tone="ok">{state.ok}</Notice>}
      {state.error && <Notice tone="error">{state.error}</Notice>}
      <Field label="Name" name="name" error={errors.name}>
        <input id="name" name="name" required defaultValue={state.ok ? "" : state.values?.name} className={inputClass} />
      </Field>
      <Field label="E-mail" name="email" error={errors.email}>
        <input id="email" name="email" type="email" required defaultValue={state.ok ? "" : state.values?.email} className={inputClass} />
      </Field>
      <Field label="Role" name="role" error={errors.role}>
        <select id="role" name="role" value={role} onChange={(e) => setRole(e.target.value as Role)} className={inputClass}>
          <RoleOptions />
        </select>
      </Field>
      {role === "customer" && (
        <Field label="Customer" name="customerId" error={errors.customerId} hint="Customer users see this customer's jobs only.">
          <select id="customerId" name="customerId" required defaultValue={state.values?.customerId ?? ""} className={inputClass}>
            <CustomerOptions customers={customers} placeholder="Choose a customer…" />
          </select>
        </Field>
      )}
      <button type="submit" disabled={pending} className={buttonClass}>
        {pending ? "Sending…" : "Send invitation"}
      </button>
      <p className="text-xs text-ink-muted">The person receives a one-time link to choose a password. It works once and expires after {validForHours % 24 === 0 && validForHours >= 48 ? `${validForHours / 24} days` : `${validForHours} hours`}.</p>
    </form>
  );
}
