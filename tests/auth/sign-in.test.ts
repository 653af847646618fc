// Signing in through the Credentials provider's authorize function, as next-auth calls it.
import { afterAll, describe, expect, it } from "vitest";
import { closeDb } from "../../db/client";
import { loadActor, verifyCredentials } from "../../lib/auth/credentials";
import { authOptions } from "../../lib/auth/options";
import { createCustomer, createUser, userRow } from "../db/fixtures";

afterAll(closeDb);

type Authorize = (credentials: Record<string, string>, request: unknown) => Promise<unknown>;
const provider = authOptions.providers[0] as unknown as { options: { authorize: Authorize } };
const authorize = (email: string, password: string) => provider.options.authorize({ email, password }, {});

describe("sign-in", () => {
  it("accepts the right password and returns id, role and customer", async () => {
    const customer = await createCustomer();
    const user = await createUser({ role: "customer", customerId: customer.id, password: "correct horse 1" });
    const result = await authorize(user.email, "correct horse 1");
    expect(result).toMatchObject({ id: String(user.id), role: "customer", customerId: customer.id, email: user.email });
    expect((await userRow(user.id)).lastSignInAt).toBeInstanceOf(Date);
  });

  it("ignores case and spaces around the e-mail", async () => {
    const user = await createUser({ role: "qa", password: "correct horse 2" });
    expect(await authorize(`  ${user.email.toUpperCase()} `, "correct horse 2")).toMatchObject({ id: String(user.id) });
  });

  it("refuses a wrong password, an unknown e-mail and an empty form in the same way (null)", async () => {
    const user = await createUser({ role: "reviewer", password: "correct horse 3" });
    expect(await authorize(user.email, "wrong horse")).toBeNull();
    expect(await authorize("nobody@tests.example", "correct horse 3")).toBeNull();
    expect(await authorize("", "")).toBeNull();
  });

  it("refuses a disabled user even with the right password", async () => {
    const user = await createUser({ role: "prepress", password: "correct horse 4", disabled: true });
    expect(await verifyCredentials({ email: user.email, password: "correct horse 4" })).toBeNull();
  });

  it("refuses an invited user who has not chosen a password yet", async () => {
    const user = await createUser({ role: "prepress" });
    expect(await verifyCredentials({ email: user.email, password: "" })).toBeNull();
  });

  it("re-reads the account on every request: a disabled account loses its session", async () => {
    const user = await createUser({ role: "qa", password: "correct horse 5" });
    expect(await loadActor(user.id)).toMatchObject({ id: user.id, role: "qa" });
    const disabled = await createUser({ role: "qa", password: "correct horse 5", disabled: true });
    expect(await loadActor(disabled.id)).toBeNull();
  });

  it("puts id, role and customer into the JWT and the session", async () => {
    const token = await authOptions.callbacks!.jwt!({
      token: { name: "N", email: "n@tests.example" },
      user: { id: "12", name: "N", email: "n@tests.example", role: "customer", customerId: 3 },
      account: null,
    } as never);
    expect(token).toMatchObject({ uid: 12, role: "customer", customerId: 3 });
    const session = await authOptions.callbacks!.session!({ session: { expires: "" }, token } as never);
    expect(session.user).toEqual({ id: 12, role: "customer", customerId: 3, name: "N", email: "n@tests.example" });
  });
});
