/** The Tympan mark: a sheet with a register cross, drawn here (no external artwork). */
export function Logo({ className = "" }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 font-semibold tracking-tight text-ink ${className}`}>
      <svg viewBox="0 0 24 24" aria-hidden="true" className="h-6 w-6">
        <rect x="3.5" y="2.5" width="17" height="19" rx="2" fill="none" stroke="currentColor" strokeWidth="1.6" />
        <circle cx="12" cy="12" r="3.4" fill="none" stroke="var(--color-accent)" strokeWidth="1.6" />
        <path d="M12 6.5v11M6.5 12h11" stroke="var(--color-accent)" strokeWidth="1.6" />
      </svg>
      <span>Tympan</span>
    </span>
  );
}
