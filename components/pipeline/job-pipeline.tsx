"use client";
// The live part of the job page. Polls the pipeline route every two seconds while anything is queued or
// running, and every thirty seconds otherwise (another user may upload at any time).
import { QueryClient, QueryClientProvider, useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import type { JobPipelineView } from "@/lib/pipeline/view";
import { ArtworkPanel } from "./artwork-panel";
import { ScanUpload } from "./scan-upload";
import { SheetsTable } from "./sheets-table";

function Pipeline({ initial }: { initial: JobPipelineView }) {
  const client = useQueryClient();
  const key = ["job-pipeline", initial.job.id];
  const { data, error } = useQuery({
    queryKey: key,
    initialData: initial,
    queryFn: async (): Promise<JobPipelineView> => {
      const res = await fetch(`/api/jobs/${initial.job.id}/pipeline`, { cache: "no-store" });
      if (!res.ok) throw new Error("The job's progress could not be refreshed; retrying.");
      return res.json();
    },
    // Every second while a sheet is being inspected: findings then show within a second of being saved.
    refetchInterval: (query) => (query.state.data?.busy ? 1000 : 30_000),
  });
  const refresh = () => void client.invalidateQueries({ queryKey: key });
  return (
    <div className="space-y-6">
      {error && <p className="text-sm text-caution">{error.message}</p>}
      <ArtworkPanel view={data} refresh={refresh} />
      <ScanUpload view={data} refresh={refresh} />
      <SheetsTable view={data} refresh={refresh} />
    </div>
  );
}

export function JobPipeline({ initial }: { initial: JobPipelineView }) {
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { staleTime: 1000, retry: 2 } } }));
  return (
    <QueryClientProvider client={client}>
      <Pipeline initial={initial} />
    </QueryClientProvider>
  );
}
