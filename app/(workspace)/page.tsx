import type { Metadata } from "next";
import Link from "next/link";
import { JobStatusBadge } from "@/components/jobs/status-badge";
import { requireActor } from "@/lib/auth/session";
import { listJobsForActor } from "@/lib/jobs/queries";

export const metadata: Metadata = { title: "Jobs" };

const dateFormat = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });

export default async function DashboardPage() {
  const actor = await requireActor();
  const jobs = await listJobsForActor(actor);
  const intro =
    actor.role === "customer"
      ? "The jobs printed for your company. Open one to see its inspected sheets."
      : "Every job in the plant. Open one to upload artwork or scans and to review inspected sheets.";
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">Jobs</h1>
        <p className="mt-1 text-sm text-ink-muted">{intro}</p>
      </div>
      {jobs.length === 0 ? (
        <div className="rounded-xl border border-dashed border-rule bg-surface px-6 py-12 text-center text-sm text-ink-muted">
          There are no jobs you can see yet.
        </div>
      ) : (
        <div className="overflow-x-auto rounded-xl border border-rule bg-surface shadow-sm">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-rule bg-paper/60 text-xs uppercase tracking-wide text-ink-muted">
              <tr>
                <th scope="col" className="px-4 py-3 font-medium">Job</th>
                <th scope="col" className="px-4 py-3 font-medium">Title</th>
                {actor.role !== "customer" && <th scope="col" className="px-4 py-3 font-medium">Customer</th>}
                <th scope="col" className="px-4 py-3 font-medium">Status</th>
                <th scope="col" className="px-4 py-3 text-right font-medium">Sheets scanned</th>
                <th scope="col" className="px-4 py-3 text-right font-medium">Awaiting sign-off</th>
                <th scope="col" className="hidden px-4 py-3 font-medium lg:table-cell">Updated</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-rule">
              {jobs.map((job) => (
                <tr key={job.id} className="hover:bg-paper/60">
                  <td className="whitespace-nowrap px-4 py-3 font-mono text-xs">
                    <Link href={`/jobs/${job.id}`} className="font-medium text-accent hover:underline">
                      {job.jobNumber}
                    </Link>
                  </td>
                  <td className="min-w-48 px-4 py-3">
                    <Link href={`/jobs/${job.id}`} className="hover:underline">
                      {job.title}
                    </Link>
                    {job.press && <div className="text-xs text-ink-muted">{job.press}</div>}
                  </td>
                  {actor.role !== "customer" && <td className="px-4 py-3">{job.customerName}</td>}
                  <td className="px-4 py-3">
                    <JobStatusBadge status={job.status} />
                  </td>
                  <td className="px-4 py-3 text-right tabular-nums">{job.scanCount}</td>
                  <td className="px-4 py-3 text-right tabular-nums">{job.openSheetCount}</td>
                  <td className="hidden whitespace-nowrap px-4 py-3 text-ink-muted lg:table-cell">{dateFormat.format(job.updatedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
