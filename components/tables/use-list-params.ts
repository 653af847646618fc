"use client";
// A list page's filters, sort and page live in the URL, so a link or a reload shows the same rows. Changing a
// filter goes back to page 1.
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useCallback, useMemo } from "react";

export function useListParams() {
  const router = useRouter();
  const pathname = usePathname();
  const search = useSearchParams();
  const params = useMemo(() => Object.fromEntries(search.entries()) as Record<string, string>, [search]);
  const set = useCallback(
    (changes: Record<string, string | number | null | undefined>, keepPage = false) => {
      const next = new URLSearchParams(search.toString());
      for (const [key, value] of Object.entries(changes)) {
        if (value === null || value === undefined || value === "") next.delete(key);
        else next.set(key, String(value));
      }
      if (!keepPage && !("page" in changes)) next.delete("page");
      const query = next.toString();
      router.replace(query ? `${pathname}?${query}` : pathname, { scroll: false });
    },
    [pathname, router, search],
  );
  return { params, set, queryString: search.toString() };
}

/** Fetches a route handler's JSON; a refusal becomes an Error carrying the server's plain-words message. */
export async function fetchJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { cache: "no-store" });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error((body as { error?: { message?: string } } | null)?.error?.message ?? "The list could not be loaded. Please try again.");
  return body as T;
}
