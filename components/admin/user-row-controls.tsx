"use client";

import { useActionState, useState } from "react";
import { changeRoleAction, resendInviteAction, setDisabledAction } from "@/app/(workspace)/admin/users/actions";
import { CustomerOptions, RoleOptions } from "@/components/admin/select-options";
import { quietButtonClass } from "@/components/ui/field";
import { ROLE_LABELS, type Role } from "@/lib/auth/policy";

const dangerButtonClass = quietButtonClass.replace("text-ink", "text-danger");

const selectClass = "rounded-md border border-rule bg-surface px-2 py-1.5 text-sm focus:border-accent focus:outline-none";

interface Props {
  user: { id: number; name: string; role: Role; customerId: number | null; disabled: boolean; invited: boolean };
  customers: { id: number; name: string }[];
  self: boolean;
}

export function RoleControl({ user, customers, self }: Props) {
  const [state, action, pending] = useActionState(changeRoleAction, {});
  const [role, setRole] = useState<Role>(user.role);
  if (self) return <span className="text-sm">{ROLE_LABELS[user.role]} <span className="text-xs text-ink-muted">(you)</span></span>;
  const message = state.error ?? state.fieldErrors?.customerId?.[0];
  return (
    <form action={action} className="flex flex-wrap items-center gap-2">
      <input type="hidden" name="userId" value={user.id} />
      <select name="role" aria-label={`Role of ${user.name}`} value={role} onChange={(e) => setRole(e.target.value as Role)} className={selectClass}>
        <RoleOptions />
      </select>
      {role === "customer" && (
        <select name="customerId" aria-label={`Customer of ${user.name}`} defaultValue={user.customerId ?? ""} required className={selectClass}>
          <CustomerOptions customers={customers} placeholder="Customer…" />
        </select>
      )}
      <button type="submit" disabled={pending} className={quietButtonClass}>
        Save
      </button>
      {message && <span className="text-xs text-danger">{message}</span>}
      {state.ok && <span className="text-xs text-ok">{state.ok}</span>}
    </form>
  );
}

export function AccountControls({ user, self }: Props) {
  const [toggleState, toggle, toggling] = useActionState(setDisabledAction, {});
  const [resendState, resend, resending] = useActionState(resendInviteAction, {});
  if (self) return null;
  const message = toggleState.error ?? resendState.error ?? resendState.ok;
  return (
    <div className="flex flex-wrap items-center justify-end gap-2">
      {user.invited && (
        <form action={resend}>
          <input type="hidden" name="userId" value={user.id} />
          <button type="submit" disabled={resending} className={quietButtonClass}>
            Resend invitation
          </button>
        </form>
      )}
      <form action={toggle}>
        <input type="hidden" name="userId" value={user.id} />
        <input type="hidden" name="disabled" value={user.disabled ? "false" : "true"} />
        <button type="submit" disabled={toggling} className={user.disabled ? quietButtonClass : dangerButtonClass}>
          {user.disabled ? "Enable" : "Disable"}
        </button>
      </form>
      {message && <span className="w-full text-right text-xs text-ink-muted">{message}</span>}
    </div>
  );
}
