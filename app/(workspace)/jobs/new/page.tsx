import type { Metadata } from "next";
import Link from "next/link";
import { forbidden } from "next/navigation";
import { JobForm } from "@/components/jobs/job-form";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";
import { jobFormOptions } from "@/lib/jobs/jobs";

export const metadata: Metadata = { title: "New job" };

export default async function NewJobPage() {
  const actor = await requireActor();
  if (!can(actor, "job.create")) forbidden();
  const options = await jobFormOptions(actor);
  return (
    <div className="max-w-3xl space-y-6">
      <div>
        <Link href="/" className="text-sm text-accent hover:underline">
          ← Jobs
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">New job</h1>
        <p className="mt-1 text-sm text-ink-muted">
          A job starts in prepress. {options.customers.length === 0 && <Link href="/customers/new" className="text-accent hover:underline">Create its customer first.</Link>}
        </p>
      </div>
      <div className="rounded-xl border border-rule bg-surface p-6 shadow-sm">
        <JobForm options={options} />
      </div>
    </div>
  );
}
