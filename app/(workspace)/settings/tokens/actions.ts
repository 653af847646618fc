"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { protectedAction } from "@/lib/auth/action";
import { createApiToken, revokeApiToken } from "@/lib/auth/tokens";

/** Printable text only: no control characters (NUL, line breaks) in a name shown in lists and audit records. */
const tokenName = z
  .string()
  .trim()
  .min(1, "Give the token a name, e.g. the scanner station it is for.")
  .max(100, "At most 100 characters.")
  .regex(/^[^\p{Cc}]*$/u, "Use letters, digits and punctuation only.");

export const createTokenAction = protectedAction(
  {
    schema: z.object({ name: tokenName, expiresInDays: z.enum(["", "7", "30", "90", "365"], "Choose one of the offered periods.") }),
    action: "api_token.manage",
  },
  async (data, actor) => {
    const expiresAt = data.expiresInDays ? new Date(Date.now() + Number(data.expiresInDays) * 86_400_000) : null;
    const { token } = await createApiToken(actor.id, actor.id, data.name, expiresAt);
    revalidatePath("/settings/tokens");
    return { ok: `Token “${data.name}” created. Copy it now: it is not shown again.`, secret: token };
  },
);

export const revokeTokenAction = protectedAction(
  { schema: z.object({ tokenId: z.coerce.number().int().positive() }), action: "api_token.manage" },
  async (data, actor) => {
    await revokeApiToken(actor, data.tokenId);
    revalidatePath("/settings/tokens");
    return { ok: "Token revoked. Programs using it are refused from now on." };
  },
);
