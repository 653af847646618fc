import Link from "next/link";

// Status 404: the address leads nowhere, or to something this account may not know about.
export default function NotFound() {
  return (
    <main className="mx-auto max-w-lg px-6 py-24 text-center">
      <p className="font-mono text-sm text-ink-muted">404</p>
      <h1 className="mt-2 text-2xl font-semibold tracking-tight">Nothing here</h1>
      <p className="mt-3 text-sm text-ink-muted">The page or job you asked for does not exist, or is not one of yours.</p>
      <Link href="/" className="mt-6 inline-block text-sm font-medium text-accent hover:underline">
        Back to your jobs
      </Link>
    </main>
  );
}
