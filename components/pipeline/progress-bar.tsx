export function ProgressBar({ fraction, label, tone = "accent" }: { fraction: number; label: string; tone?: "accent" | "danger" | "ok" }) {
  const percent = Math.round(Math.max(0, Math.min(1, fraction)) * 100);
  const fill = { accent: "bg-accent", danger: "bg-danger", ok: "bg-ok" }[tone];
  return (
    <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={percent} className="h-2 w-full overflow-hidden rounded-full bg-rule/60">
      <div className={`h-full ${fill} transition-[width] duration-300`} style={{ width: `${percent}%` }} />
    </div>
  );
}
