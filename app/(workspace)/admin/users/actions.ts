"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { protectedAction } from "@/lib/auth/action";
import { changeRole, inviteSchema, inviteUser, resendInvite, roleAssignmentSchema, setDisabled } from "@/lib/users/admin";

const userId = z.coerce.number().int().positive();

export const inviteAction = protectedAction({ schema: inviteSchema, action: "user.manage" }, async (data, actor) => {
  await inviteUser(actor, data);
  revalidatePath("/admin/users");
  return { ok: `Invitation sent to ${data.email}.` };
});

export const changeRoleAction = protectedAction(
  { schema: z.intersection(z.object({ userId }), roleAssignmentSchema), action: "user.manage" },
  async (data, actor) => {
    await changeRole(actor, data.userId, data);
    revalidatePath("/admin/users");
    return { ok: "Role saved." };
  },
);

export const setDisabledAction = protectedAction(
  { schema: z.object({ userId, disabled: z.enum(["true", "false"]) }), action: "user.manage" },
  async (data, actor) => {
    await setDisabled(actor, data.userId, data.disabled === "true");
    revalidatePath("/admin/users");
    return { ok: data.disabled === "true" ? "Account disabled." : "Account enabled." };
  },
);

export const resendInviteAction = protectedAction({ schema: z.object({ userId }), action: "user.manage" }, async (data, actor) => {
  await resendInvite(actor, data.userId);
  revalidatePath("/admin/users");
  return { ok: "A new invitation was sent." };
});
