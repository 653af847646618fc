// `npm run db:seed`: an invented demo plant. Wrenfold Carton Works Ltd. prints folding cartons for two invented
// brand owners, a tea blender and a maker of generic medicines. Every name, address and product is fictional.
// Safe to run again: rows are matched on their unique keys and updated, never duplicated.
import { eq, inArray } from "drizzle-orm";
import { hashPassword } from "../lib/auth/password";
import type { Role } from "../lib/auth/policy";
import { closeDb, db } from "./client";
import { customers, jobs, toleranceProfiles, users } from "./schema";

export const DEMO_PASSWORD = "tympan-demo";

export const DEMO_CUSTOMERS = ["Kestrelmoor Tea Company", "Alverin Generics Ltd."] as const;

/** Who each customer wants told of sign-offs (invented addresses). */
const DEMO_CONTACTS: Record<(typeof DEMO_CUSTOMERS)[number], string[]> = {
  "Kestrelmoor Tea Company": ["buyer@kestrelmoor.example", "packaging@kestrelmoor.example"],
  "Alverin Generics Ltd.": ["quality@alverin.example", "artwork.control@alverin.example"],
};

export const DEMO_USERS: { email: string; name: string; role: Role; customer?: (typeof DEMO_CUSTOMERS)[number] }[] = [
  { email: "admin@wrenfold.example", name: "Ada Penrose", role: "admin" },
  { email: "prepress@wrenfold.example", name: "Tomas Reyne", role: "prepress" },
  { email: "qa@wrenfold.example", name: "Mirela Oduya", role: "qa" },
  { email: "reviewer@wrenfold.example", name: "Hal Brightwater", role: "reviewer" },
  { email: "buyer@kestrelmoor.example", name: "Nell Ashcombe", role: "customer", customer: "Kestrelmoor Tea Company" },
  { email: "quality@alverin.example", name: "Dr. Ines Falk", role: "customer", customer: "Alverin Generics Ltd." },
];

const DEMO_JOBS = [
  { jobNumber: "WF-24117", customer: "Kestrelmoor Tea Company", title: "Breakfast Blend 40 bags, carton", stock: "GC1 folding boxboard 300 g/m²", boardThicknessUm: 450, press: "Sheet-fed offset, 6 colours + coater", runLengthSheets: 18000, status: "on_press", upsRows: 2, upsColumns: 4, profile: "standard-food" },
  { jobNumber: "WF-24118", customer: "Kestrelmoor Tea Company", title: "Moorland Earl Grey 20 bags, carton", stock: "GC1 folding boxboard 300 g/m²", boardThicknessUm: 450, press: "Sheet-fed offset, 6 colours + coater", runLengthSheets: null, status: "prepress", upsRows: 2, upsColumns: 3, profile: "standard-food" },
  { jobNumber: "WF-24121", customer: "Alverin Generics Ltd.", title: "Paracetamol 500 mg, 16 tablets, carton", stock: "GD2 folding boxboard 280 g/m²", boardThicknessUm: 390, press: "Sheet-fed offset, 5 colours", runLengthSheets: 42000, status: "on_press", upsRows: 3, upsColumns: 5, profile: "strict-pharma" },
  { jobNumber: "WF-24122", customer: "Alverin Generics Ltd.", title: "Ibuprofen 200 mg, 24 tablets, carton", stock: "GD2 folding boxboard 280 g/m²", boardThicknessUm: 390, press: "Sheet-fed offset, 5 colours", runLengthSheets: 30000, status: "completed", upsRows: 3, upsColumns: 4, profile: "strict-pharma" },
] as const;

interface ProfileSeed {
  name: string;
  label: string;
  minDefectMm: number;
  deltaE00Threshold: number;
  registrationToleranceMm: number;
  excludedAreasMm: { x: number; y: number; w: number; h: number }[];
}

// The engine's own list is the source; this copy is only used while the engine module is absent.
const FALLBACK_PROFILES: ProfileSeed[] = [
  { name: "strict-pharma", label: "Medicines and medical devices", minDefectMm: 0.2, deltaE00Threshold: 3, registrationToleranceMm: 0.1, excludedAreasMm: [] },
  { name: "standard-food", label: "Food and general consumer packaging", minDefectMm: 0.3, deltaE00Threshold: 4, registrationToleranceMm: 0.15, excludedAreasMm: [] },
];

async function builtinProfiles(): Promise<ProfileSeed[]> {
  try {
    const engine = (await import("../lib/imaging/profiles")) as { listProfiles?: () => ProfileSeed[] };
    if (typeof engine.listProfiles === "function") return engine.listProfiles();
  } catch {
    // Engine not built yet: fall back below.
  }
  console.warn("lib/imaging/profiles.ts has no listProfiles(); seeding the fallback tolerance profiles.");
  return FALLBACK_PROFILES;
}

const um = (mm: number) => Math.round(mm * 1000);

export async function seedTolerances(): Promise<void> {
  for (const p of await builtinProfiles()) {
    const values = {
      label: p.label,
      minDefectUm: um(p.minDefectMm),
      deltaE00Threshold: p.deltaE00Threshold,
      registrationToleranceUm: um(p.registrationToleranceMm),
      excludedAreasMm: p.excludedAreasMm,
      builtin: true,
    };
    await db.insert(toleranceProfiles).values({ name: p.name, ...values }).onDuplicateKeyUpdate({ set: values });
  }
}

export async function seedDemo(): Promise<void> {
  await seedTolerances();
  for (const name of DEMO_CUSTOMERS) {
    const contactEmails = DEMO_CONTACTS[name];
    await db.insert(customers).values({ name, contactEmails }).onDuplicateKeyUpdate({ set: { name, contactEmails } });
  }
  const customerRows = await db.select().from(customers).where(inArray(customers.name, [...DEMO_CUSTOMERS]));
  const customerId = (name: string) => customerRows.find((c) => c.name === name)!.id;

  const passwordHash = await hashPassword(DEMO_PASSWORD);
  for (const u of DEMO_USERS) {
    const values = { name: u.name, role: u.role, customerId: u.customer ? customerId(u.customer) : null, passwordHash, disabled: false };
    await db.insert(users).values({ email: u.email, ...values }).onDuplicateKeyUpdate({ set: values });
  }
  const [admin] = await db.select({ id: users.id }).from(users).where(eq(users.email, DEMO_USERS[0].email));

  const profileRows = await db.select({ id: toleranceProfiles.id, name: toleranceProfiles.name }).from(toleranceProfiles);
  for (const { customer, profile, ...job } of DEMO_JOBS) {
    const toleranceProfileId = profileRows.find((p) => p.name === profile)?.id ?? null;
    const values = { ...job, customerId: customerId(customer), artworkDpi: 300, toleranceProfileId };
    await db.insert(jobs).values({ ...values, createdBy: admin.id }).onDuplicateKeyUpdate({ set: values });
  }
}

if (process.argv[1]?.endsWith("seed.ts")) {
  try {
    await seedDemo();
    console.log(`Demo data seeded: ${DEMO_CUSTOMERS.length} customers, ${DEMO_USERS.length} users, ${DEMO_JOBS.length} jobs.`);
  } catch (error) {
    console.error("Seeding failed:", error);
    process.exitCode = 1;
  } finally {
    await closeDb();
  }
}
