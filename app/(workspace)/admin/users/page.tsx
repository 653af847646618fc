import type { Metadata } from "next";
import { AccountControls, RoleControl } from "@/components/admin/user-row-controls";
import { InviteForm } from "@/components/admin/invite-form";
import { forbidden } from "next/navigation";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";
import { listCustomers, listUsers } from "@/lib/users/admin";
import { INVITE_TTL_MS } from "@/lib/users/invites";

export const metadata: Metadata = { title: "Users" };

const dateFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: "UTC" });

function AccountState({ disabled, invited, inviteOpen }: { disabled: boolean; invited: boolean; inviteOpen: boolean }) {
  if (disabled) return <span className="rounded-full bg-danger-soft px-2 py-0.5 text-xs font-medium text-danger">Disabled</span>;
  if (invited)
    return (
      <span className="rounded-full bg-caution-soft px-2 py-0.5 text-xs font-medium text-caution">
        {inviteOpen ? "Invited" : "Invitation expired"}
      </span>
    );
  return <span className="rounded-full bg-ok-soft px-2 py-0.5 text-xs font-medium text-ok">Active</span>;
}

export default async function UsersPage() {
  const actor = await requireActor();
  if (!can(actor, "user.manage")) forbidden();
  const [users, customers] = await Promise.all([listUsers(actor), listCustomers()]);
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">Users</h1>
        <p className="mt-1 text-sm text-ink-muted">Invite people, set what they may do, and switch accounts off. Every change is recorded.</p>
      </div>
      <div className="grid gap-6 lg:grid-cols-[1fr_20rem]">
        <div className="overflow-x-auto rounded-xl border border-rule bg-surface shadow-sm">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-rule bg-paper/60 text-xs uppercase tracking-wide text-ink-muted">
              <tr>
                <th scope="col" className="px-4 py-3 font-medium">Person</th>
                <th scope="col" className="px-4 py-3 font-medium">Role</th>
                <th scope="col" className="px-4 py-3 font-medium">Account</th>
                <th scope="col" className="px-4 py-3 text-right font-medium"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody className="divide-y divide-rule">
              {users.map((user) => (
                <tr key={user.id} className={user.disabled ? "bg-paper/50 text-ink-muted" : undefined}>
                  <td className="px-4 py-3">
                    <div className="font-medium">{user.name}</div>
                    <div className="text-xs text-ink-muted">{user.email}</div>
                    {user.customerName && <div className="text-xs text-ink-muted">{user.customerName}</div>}
                  </td>
                  <td className="px-4 py-3">
                    <RoleControl user={user} customers={customers} self={user.id === actor.id} />
                  </td>
                  <td className="px-4 py-3">
                    <AccountState {...user} />
                    <div className="mt-1 text-xs text-ink-muted">
                      {user.lastSignInAt ? `Last sign-in ${dateFormat.format(user.lastSignInAt)} UTC` : "Never signed in"}
                    </div>
                  </td>
                  <td className="px-4 py-3">
                    <AccountControls user={user} customers={customers} self={user.id === actor.id} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <section className="order-first h-fit rounded-xl border border-rule bg-surface p-6 shadow-sm lg:order-none" aria-labelledby="invite-heading">
          <h2 id="invite-heading" className="text-base font-semibold">Invite a person</h2>
          <div className="mt-4">
            <InviteForm customers={customers} validForHours={INVITE_TTL_MS / 3_600_000} />
          </div>
        </section>
      </div>
    </div>
  );
}
