// The frame of a page that holds one form (new or edit customer, new or edit job): a link back, the title, an
// optional line of introduction, and the form on its card.
import Link from "next/link";
import type { ReactNode } from "react";

export function FormPage(props: { backHref: string; backLabel: ReactNode; title: string; intro?: ReactNode; wide?: boolean; children: ReactNode }) {
  return (
    <div className={`${props.wide ? "max-w-3xl" : "max-w-2xl"} space-y-6`}>
      <div>
        <Link href={props.backHref} className="text-sm text-accent hover:underline">
          ← {props.backLabel}
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">{props.title}</h1>
        {props.intro && <p className="mt-1 text-sm text-ink-muted">{props.intro}</p>}
      </div>
      <div className="rounded-xl border border-rule bg-surface p-6 shadow-sm">{props.children}</div>
    </div>
  );
}
