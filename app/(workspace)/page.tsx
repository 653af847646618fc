import type { Metadata } from "next";
import Link from "next/link";
import { AttentionPanel } from "@/components/home/attention-panel";
import { JobsTable } from "@/components/jobs/jobs-table";
import { buttonClass } from "@/components/ui/field";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Jobs" };

export default async function HomePage() {
  const actor = await requireActor();
  const intro =
    actor.role === "customer"
      ? "The jobs printed for your company. Open one to see its inspected sheets and their sign-offs."
      : "Every job in the plant. Open one to upload artwork or scans and to review inspected sheets.";
  return (
    <div className="space-y-8">
      <AttentionPanel />
      <section aria-labelledby="jobs-heading" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h1 id="jobs-heading" className="text-2xl font-semibold tracking-tight">
              Jobs
            </h1>
            <p className="mt-1 text-sm text-ink-muted">{intro}</p>
          </div>
          {can(actor, "job.create") && (
            <Link href="/jobs/new" className={buttonClass}>
              New job
            </Link>
          )}
        </div>
        <JobsTable showCustomer={actor.role !== "customer"} />
      </section>
    </div>
  );
}
