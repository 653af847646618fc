// An invented customer, job and one user per role for one test file, with unique names so test files and
// reruns never collide in the shared test database.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { customers, jobs, toleranceProfiles, users } from "@/db/schema";
import type { Actor, Role } from "@/lib/auth/policy";
import { listProfiles } from "@/lib/imaging/profiles";

export interface Fixture {
  jobId: number;
  customerId: number;
  actors: Record<Role, Actor>;
}

export async function ensureProfiles(): Promise<void> {
  for (const p of listProfiles()) {
    const [found] = await db.select({ id: toleranceProfiles.id }).from(toleranceProfiles).where(eq(toleranceProfiles.name, p.name));
    if (found) continue;
    await db.insert(toleranceProfiles).values({
      name: p.name,
      label: p.label,
      minDefectUm: Math.round(p.minDefectMm * 1000),
      deltaE00Threshold: p.deltaE00Threshold,
      registrationToleranceUm: Math.round(p.registrationToleranceMm * 1000),
      excludedAreasMm: p.excludedAreasMm,
      builtin: true,
    });
  }
}

export async function makeFixture(ups = { rows: 1, columns: 2 }): Promise<Fixture> {
  await ensureProfiles();
  const tag = randomUUID().slice(0, 8);
  const [{ id: customerId }] = await db.insert(customers).values({ name: `Halloway Oat Mills ${tag}` }).$returningId();
  const [{ id: jobId }] = await db
    .insert(jobs)
    .values({ customerId, jobNumber: `P-${tag}`, title: "Porridge oats 500 g, carton", upsRows: ups.rows, upsColumns: ups.columns })
    .$returningId();
  const actors = {} as Record<Role, Actor>;
  for (const role of ["admin", "prepress", "qa", "reviewer", "customer"] as Role[]) {
    const email = `${role}-${tag}@pipeline.example`;
    const name = `${role[0].toUpperCase()}${role.slice(1)} ${tag}`;
    const [{ id }] = await db
      .insert(users)
      .values({ email, name, role, customerId: role === "customer" ? customerId : null })
      .$returningId();
    actors[role] = { id, role, customerId: role === "customer" ? customerId : null, name, email };
  }
  return { jobId, customerId, actors };
}

export function multipart(files: { name: string; data: Uint8Array }[], fields: Record<string, string> = {}): Request {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  for (const f of files) form.append("file", new Blob([new Uint8Array(f.data)]), f.name);
  return new Request("http://127.0.0.1/upload", { method: "POST", body: form });
}

export async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 90_000, everyMs = 250): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > end) throw new Error(`Timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}
