import type { Metadata } from "next";
import Link from "next/link";
import { forbidden } from "next/navigation";
import { JobForm } from "@/components/jobs/job-form";
import { FormPage } from "@/components/ui/form-page";
import { can } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";
import { jobFormOptions } from "@/lib/jobs/jobs";

export const metadata: Metadata = { title: "New job" };

export default async function NewJobPage() {
  const actor = await requireActor();
  if (!can(actor, "job.create")) forbidden();
  const options = await jobFormOptions(actor);
  const intro = (
    <>
      A job starts in prepress.{" "}
      {options.customers.length === 0 && (
        <Link href="/customers/new" className="text-accent hover:underline">
          Create its customer first.
        </Link>
      )}
    </>
  );
  return (
    <FormPage backHref="/" backLabel="Jobs" title="New job" intro={intro} wide>
      <JobForm options={options} />
    </FormPage>
  );
}
