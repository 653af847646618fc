const labels = {
  prepress: "In prepress",
  on_press: "On press",
  completed: "Completed",
  cancelled: "Cancelled",
} as const;

const tones = {
  prepress: "bg-paper text-ink-muted border-rule",
  on_press: "bg-accent-soft text-accent-strong border-accent/20",
  completed: "bg-ok-soft text-ok border-ok/20",
  cancelled: "bg-danger-soft text-danger border-danger/20",
} as const;

export type JobStatus = keyof typeof labels;

export function JobStatusBadge({ status }: { status: JobStatus }) {
  return (
    <span className={`inline-flex items-center whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium ${tones[status]}`}>
      {labels[status]}
    </span>
  );
}
