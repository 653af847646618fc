import type { Metadata } from "next";
import Link from "next/link";
import { RevokeTokenButton } from "@/components/settings/revoke-token-button";
import { TokenForm } from "@/components/settings/token-form";
import { authorize, ROLE_LABELS } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";
import { listApiTokens, type TokenSummary } from "@/lib/auth/tokens";

export const metadata: Metadata = { title: "API tokens" };

const dateFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: "UTC" });
const when = (d: Date | null, none: string) => (d ? `${dateFormat.format(d)} UTC` : none);

function state(token: TokenSummary): { label: string; live: boolean } {
  if (token.revokedAt) return { label: `Revoked ${when(token.revokedAt, "")}`, live: false };
  if (token.expiresAt && token.expiresAt.getTime() <= Date.now()) return { label: `Expired ${when(token.expiresAt, "")}`, live: false };
  return { label: token.expiresAt ? `Expires ${when(token.expiresAt, "")}` : "Does not expire", live: true };
}

export default async function TokensPage() {
  const actor = await requireActor();
  authorize(actor, "api_token.manage");
  const tokens = await listApiTokens(actor.id);
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">API tokens</h1>
        <p className="mt-1 max-w-3xl text-sm text-ink-muted">
          A token lets a program — a scanner station, an order system — use Tympan&apos;s API as you, with your role ({ROLE_LABELS[actor.role]}).
          Send it as <code className="font-mono text-xs">Authorization: Bearer …</code>. See the <Link className="text-accent-strong underline" href="/api-reference">API reference</Link>.
        </p>
      </div>
      <div className="grid gap-6 lg:grid-cols-[1fr_20rem]">
        <div className="overflow-x-auto rounded-xl border border-rule bg-surface shadow-sm">
          {tokens.length === 0 ? (
            <p className="p-6 text-sm text-ink-muted">You have no tokens yet.</p>
          ) : (
            <table className="w-full text-left text-sm">
              <thead className="border-b border-rule bg-paper/60 text-xs uppercase tracking-wide text-ink-muted">
                <tr>
                  <th scope="col" className="px-4 py-3 font-medium">Name</th>
                  <th scope="col" className="px-4 py-3 font-medium">State</th>
                  <th scope="col" className="px-4 py-3 font-medium">Last used</th>
                  <th scope="col" className="px-4 py-3 text-right font-medium"><span className="sr-only">Actions</span></th>
                </tr>
              </thead>
              <tbody className="divide-y divide-rule">
                {tokens.map((token) => {
                  const s = state(token);
                  return (
                    <tr key={token.id} className={s.live ? undefined : "bg-paper/50 text-ink-muted"}>
                      <td className="max-w-64 break-words px-4 py-3">
                        <div className="font-medium">{token.name}</div>
                        <div className="text-xs text-ink-muted">Created {when(token.createdAt, "")}</div>
                      </td>
                      <td className="px-4 py-3 text-xs">{s.label}</td>
                      <td className="px-4 py-3 text-xs">{when(token.lastUsedAt, "Never")}</td>
                      <td className="px-4 py-3 text-right">{s.live && <RevokeTokenButton tokenId={token.id} name={token.name} />}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          )}
        </div>
        <section className="order-first h-fit rounded-xl border border-rule bg-surface p-6 shadow-sm lg:order-none" aria-labelledby="new-token-heading">
          <h2 id="new-token-heading" className="text-base font-semibold">New token</h2>
          <p className="mt-1 text-xs text-ink-muted">It is shown once, right after you create it; Tympan keeps only a fingerprint of it.</p>
          <div className="mt-4">
            <TokenForm />
          </div>
        </section>
      </div>
    </div>
  );
}
