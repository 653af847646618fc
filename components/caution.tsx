/** The standing caution wherever colour figures or sign-off appear. */
export function ScanCaution({ className = "" }: { className?: string }) {
  return (
    <p className={`text-sm text-ink-muted ${className}`}>
      Colour figures from a flatbed scan are indicative only; a spectrophotometer decides. Sheet sign-off stays with
      qualified staff, under the customer&apos;s and the regulator&apos;s rules.
    </p>
  );
}
