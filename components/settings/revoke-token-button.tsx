"use client";

import { useActionState } from "react";
import { revokeTokenAction } from "@/app/(workspace)/settings/tokens/actions";
import { quietButtonClass } from "@/components/ui/field";

export function RevokeTokenButton({ tokenId, name }: { tokenId: number; name: string }) {
  const [state, action, pending] = useActionState(revokeTokenAction, {});
  return (
    <form action={action} className="inline-flex items-center gap-2">
      <input type="hidden" name="tokenId" value={tokenId} />
      {state.error && <span className="text-xs text-danger">{state.error}</span>}
      <button type="submit" disabled={pending} className={quietButtonClass} aria-label={`Revoke ${name}`}>
        {pending ? "Revoking…" : "Revoke"}
      </button>
    </form>
  );
}
