"use server";

import { redirect } from "next/navigation";
import type { ActionState } from "@/lib/auth/action";
import { AppError } from "@/lib/errors";
import { acceptInvite } from "@/lib/users/invites";

// Public on purpose: the one-time token is the credential. It is checked and spent in one transaction.
export async function setPasswordAction(_previous: ActionState, formData: FormData): Promise<ActionState> {
  const token = String(formData.get("token") ?? "");
  const password = String(formData.get("password") ?? "");
  const repeat = String(formData.get("repeat") ?? "");
  if (password !== repeat) return { fieldErrors: { repeat: ["The two passwords differ."] } };
  try {
    await acceptInvite(token, password);
  } catch (error) {
    if (error instanceof AppError) {
      return error.code === "password_too_weak" ? { fieldErrors: { password: [error.message] } } : { error: error.message };
    }
    throw error;
  }
  redirect("/sign-in?password=set");
}
