"use client";

import { signOut } from "next-auth/react";
import { quietButtonClass } from "@/components/ui/field";

export function SignOutButton() {
  return (
    <button type="button" className={quietButtonClass} onClick={() => signOut({ callbackUrl: "/sign-in" })}>
      Sign out
    </button>
  );
}
