// User administration: the invitation e-mail arrives (read back from the mail fake's REST API), its link works
// once and expires; role changes and disabling are refused to non-admins and each leave an audit event.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { auditEvents, users } from "../../db/schema";
import { loadActor, verifyCredentials } from "../../lib/auth/credentials";
import { changeRole, inviteUser, listUsers, setDisabled } from "../../lib/users/admin";
import { acceptInvite, createInvite, findOpenInvite } from "../../lib/users/invites";
import { createCustomer, createUser, unique } from "../db/fixtures";

const inbox = `http://127.0.0.1:${process.env.MAILDEV_WEB_PORT ?? "1080"}/api/email`;

interface Mail {
  to: { address: string }[];
  subject: string;
  text: string;
}

async function mailTo(address: string): Promise<Mail> {
  for (let i = 0; i < 50; i++) {
    const mails = (await (await fetch(inbox)).json()) as Mail[];
    const found = mails.find((m) => m.to.some((t) => t.address === address));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`No e-mail to ${address} arrived at ${inbox}`);
}

async function auditFor(userId: number, action: string) {
  return db
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.subjectType, "user"), eq(auditEvents.subjectId, String(userId)), eq(auditEvents.action, action)));
}

let admin: Awaited<ReturnType<typeof createUser>>;
beforeAll(async () => {
  admin = await createUser({ role: "admin", password: "admin password 1" });
});
afterAll(closeDb);

describe("inviting a user", () => {
  it("sends a one-time link that sets the password once and then stops working", async () => {
    const email = `${unique("invitee")}@tests.example`;
    const { userId } = await inviteUser(admin, { email, name: "Ivo Invitee", role: "reviewer", customerId: null });
    expect((await auditFor(userId, "user.invite")).length).toBe(1);

    const mail = await mailTo(email);
    expect(mail.subject).toBe("Your Tympan account");
    const link = mail.text.match(/https?:\/\/\S+\/set-password\/([A-Za-z0-9_-]+)/);
    expect(link, mail.text).not.toBeNull();
    const token = link![1];

    expect(await findOpenInvite(token)).toMatchObject({ userId, email });
    await acceptInvite(token, "a new password 1");
    expect(await verifyCredentials({ email, password: "a new password 1" })).toMatchObject({ id: userId, role: "reviewer" });
    expect((await auditFor(userId, "user.password_set")).length).toBe(1);

    expect(await findOpenInvite(token)).toBeNull();
    await expect(acceptInvite(token, "another password 2")).rejects.toMatchObject({ code: "invite_invalid" });
    expect(await verifyCredentials({ email, password: "another password 2" })).toBeNull();
  });

  it("refuses an expired link", async () => {
    const invitee = await createUser({ role: "qa" });
    const longAgo = new Date(Date.now() - 30 * 24 * 3600 * 1000);
    const { token } = await db.transaction((tx) => createInvite(tx, invitee.id, admin.id, longAgo));
    expect(await findOpenInvite(token)).toBeNull();
    await expect(acceptInvite(token, "a new password 3")).rejects.toMatchObject({ code: "invite_invalid" });
  });

  it("refuses a short password and keeps the link usable", async () => {
    const invitee = await createUser({ role: "qa" });
    const { token } = await db.transaction((tx) => createInvite(tx, invitee.id, admin.id));
    await expect(acceptInvite(token, "short")).rejects.toMatchObject({ code: "password_too_weak" });
    expect(await findOpenInvite(token)).not.toBeNull();
  });

  it("refuses a second account for the same e-mail, and a customer user without a customer", async () => {
    const existing = await createUser({ role: "qa" });
    await expect(inviteUser(admin, { email: existing.email, name: "Again", role: "qa", customerId: null })).rejects.toMatchObject({ code: "email_taken" });
    await expect(inviteUser(admin, { email: `${unique("c")}@tests.example`, name: "C", role: "customer", customerId: null })).rejects.toThrow(/customer/i);
  });

  it("is refused to anyone but an admin", async () => {
    const prepress = await createUser({ role: "prepress" });
    await expect(inviteUser(prepress, { email: `${unique("x")}@tests.example`, name: "X", role: "qa", customerId: null })).rejects.toMatchObject({
      code: "forbidden",
    });
    await expect(listUsers(prepress)).rejects.toMatchObject({ status: 403 });
  });
});

describe("changing a user", () => {
  it("changes the role and customer, and records both before and after", async () => {
    const customer = await createCustomer();
    const user = await createUser({ role: "reviewer" });
    await changeRole(admin, user.id, { role: "customer", customerId: customer.id });
    expect(await loadActor(user.id)).toMatchObject({ role: "customer", customerId: customer.id });
    const [event] = await auditFor(user.id, "user.role_change");
    expect(event.actorId).toBe(admin.id);
    expect(event.details).toMatchObject({ from: { role: "reviewer", customerId: null }, to: { role: "customer", customerId: customer.id } });
  });

  it("disables and enables an account; a disabled user cannot sign in", async () => {
    const user = await createUser({ role: "qa", password: "qa password 12" });
    await setDisabled(admin, user.id, true);
    expect(await verifyCredentials({ email: user.email, password: "qa password 12" })).toBeNull();
    expect(await loadActor(user.id)).toBeNull();
    await setDisabled(admin, user.id, false);
    expect(await verifyCredentials({ email: user.email, password: "qa password 12" })).toMatchObject({ id: user.id });
    expect((await auditFor(user.id, "user.disable")).length).toBe(1);
    expect((await auditFor(user.id, "user.enable")).length).toBe(1);
  });

  it("refuses changes to one's own account and changes by non-admins", async () => {
    await expect(setDisabled(admin, admin.id, true)).rejects.toMatchObject({ code: "own_account" });
    await expect(changeRole(admin, admin.id, { role: "qa", customerId: null })).rejects.toMatchObject({ code: "own_account" });
    const reviewer = await createUser({ role: "reviewer" });
    const target = await createUser({ role: "qa" });
    await expect(setDisabled(reviewer, target.id, true)).rejects.toMatchObject({ code: "forbidden" });
    const [row] = await db.select().from(users).where(eq(users.id, target.id));
    expect(row.disabled).toBe(false);
  });
});
