import { Logo } from "@/components/logo";
import { ScanCaution } from "@/components/caution";

/** The frame of the pages a signed-out person sees (sign-in, choosing a password). */
export function AuthCard({ title, intro, children }: { title: string; intro?: string; children: React.ReactNode }) {
  return (
    <main className="flex min-h-screen flex-col items-center justify-center px-4 py-12">
      <div className="w-full max-w-sm">
        <Logo className="mb-8 text-lg" />
        <div className="rounded-xl border border-rule bg-surface p-8 shadow-sm">
          <h1 className="text-xl font-semibold tracking-tight">{title}</h1>
          {intro && <p className="mt-1 text-sm text-ink-muted">{intro}</p>}
          <div className="mt-6">{children}</div>
        </div>
        <ScanCaution className="mt-6 text-xs" />
      </div>
    </main>
  );
}
