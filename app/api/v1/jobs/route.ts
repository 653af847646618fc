// GET /api/v1/jobs: the jobs the caller may read (customer users: their own customer's), newest change first.
// POST /api/v1/jobs: a new job (admin, prepress), through lib/jobs.
import { json, page, readQuery, route } from "@/lib/api/http";
import { PageQuery } from "@/lib/api/schemas";
import { jobSummary } from "@/lib/api/views";
import { requestActor } from "@/lib/auth/request-actor";
import { readObject } from "@/lib/api/json-routes";
import { createJob } from "@/lib/jobs/jobs";
import { listJobsForActor } from "@/lib/jobs/queries";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = route(async (request) => {
  const actor = await requestActor(request);
  const query = readQuery(request, PageQuery);
  const jobs = await listJobsForActor(actor);
  const result = page(jobs, (j) => [j.updatedAt.toISOString(), j.id], query.limit, query.cursor);
  return json({ items: result.items.map(jobSummary), nextCursor: result.nextCursor });
});

export const POST = route(async (request) => {
  const actor = await requestActor(request);
  return json(await createJob(actor, await readObject(request)), 201);
});
