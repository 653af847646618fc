import Link from "next/link";

// Shown with status 403 when a page calls forbidden(): the person is signed in but their role does not open it.
export default function Forbidden() {
  return (
    <main className="mx-auto max-w-lg px-6 py-24 text-center">
      <p className="font-mono text-sm text-ink-muted">403</p>
      <h1 className="mt-2 text-2xl font-semibold tracking-tight">This page is not open to your role</h1>
      <p className="mt-3 text-sm text-ink-muted">Your account is signed in, but what you asked for needs another role. An administrator can change roles.</p>
      <Link href="/" className="mt-6 inline-block text-sm font-medium text-accent hover:underline">
        Back to your jobs
      </Link>
    </main>
  );
}
