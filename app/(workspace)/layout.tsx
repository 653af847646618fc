import Link from "next/link";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { ScanCaution } from "@/components/caution";
import { Logo } from "@/components/logo";
import { NavLinks, type NavItem } from "@/components/shell/nav-links";
import { QueryProvider } from "@/components/shell/query-provider";
import { can, ROLE_LABELS } from "@/lib/auth/policy";
import { requireActor } from "@/lib/auth/session";

// Every page below is for signed-in users; each page still checks the policy for what it shows.
export default async function WorkspaceLayout({ children }: { children: React.ReactNode }) {
  const actor = await requireActor();
  const items: NavItem[] = [{ href: "/", label: "Jobs" }];
  if (can(actor, "customer.manage")) items.push({ href: "/customers", label: "Customers" });
  if (can(actor, "user.manage")) items.push({ href: "/admin/users", label: "Users" });
  if (can(actor, "audit.read")) items.push({ href: "/admin/audit", label: "Audit trail" });
  items.push({ href: "/settings/tokens", label: "API tokens" });
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-rule bg-surface">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3 sm:px-6">
          <Link href="/" aria-label="Tympan, jobs">
            <Logo />
          </Link>
          <NavLinks items={items} />
          <div className="ml-auto flex items-center gap-3">
            <div className="text-right leading-tight">
              <div className="text-sm font-medium">{actor.name}</div>
              <div className="text-xs text-ink-muted">{ROLE_LABELS[actor.role]}</div>
            </div>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main className="mx-auto w-full max-w-7xl flex-1 px-4 py-8 sm:px-6">
        <QueryProvider>{children}</QueryProvider>
      </main>
      <footer className="border-t border-rule">
        <div className="mx-auto max-w-7xl px-4 py-4 sm:px-6">
          <ScanCaution className="text-xs" />
        </div>
      </footer>
    </div>
  );
}
