import "server-only";
// The signed-in actor for pages, server actions and route handlers. The JWT only names the user: role, customer
// and the disabled flag are read from the database on every call, so a change by an admin applies at once.
import { getServerSession } from "next-auth";
import { redirect } from "next/navigation";
import { cache } from "react";
import { notSignedIn } from "../errors";
import { loadActor } from "./credentials";
import { authOptions } from "./options";
import type { Actor } from "./policy";

/** The current actor, or null when nobody is signed in or the account was disabled. One lookup per request. */
export const getActor = cache(async (): Promise<Actor | null> => {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (typeof id !== "number" || !Number.isFinite(id)) return null;
  return loadActor(id);
});

/** For pages and layouts: the actor, or a redirect to the sign-in page. */
export async function requireActor(): Promise<Actor> {
  const actor = await getActor();
  if (!actor) redirect("/sign-in");
  return actor;
}

/** For route handlers and server actions: the actor, or the 401 AppError `notSignedIn()`. */
export async function actorOrThrow(): Promise<Actor> {
  const actor = await getActor();
  if (!actor) throw notSignedIn();
  return actor;
}
