"use server";
// The job form's actions. Input is checked by lib/jobs (the same schema the API uses); a refusal comes back
// field by field to the form, which keeps what was typed.
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { protectedAction } from "@/lib/auth/action";
import { createJob, updateJob } from "@/lib/jobs/jobs";

const formFields = z.looseObject({});

export const createJobAction = protectedAction({ schema: formFields, action: "job.create" }, async (data, actor) => {
  const job = await createJob(actor, data);
  revalidatePath("/");
  redirect(`/jobs/${job.id}?created=1`);
});

export const updateJobAction = protectedAction({ schema: formFields, action: "job.update" }, async (data, actor) => {
  const job = await updateJob(actor, Number(data.jobId), data);
  revalidatePath(`/jobs/${job.id}`);
  redirect(`/jobs/${job.id}?saved=1`);
});
