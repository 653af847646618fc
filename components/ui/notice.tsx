const tones = {
  error: "border-danger/30 bg-danger-soft text-danger",
  ok: "border-ok/30 bg-ok-soft text-ok",
  caution: "border-caution/30 bg-caution-soft text-caution",
} as const;

export function Notice({ tone, children }: { tone: keyof typeof tones; children: React.ReactNode }) {
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`break-words rounded-md border px-3 py-2 text-sm ${tones[tone]}`}>
      {children}
    </div>
  );
}
