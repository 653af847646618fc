// The preflight's warning on a revision whose PDF uses fonts it does not embed: the press's RIP and pdf.js each
// put a font of their own in their place, so type differs between sheet and raster and shows as findings.
import { Notice } from "@/components/ui/notice";
import type { RevisionView } from "@/lib/pipeline/view";

/** Names shown before "and N more": a PDF with dozens of loose fonts needs re-exporting either way. */
const NAMES_SHOWN = 10;

/** `mayUpload`: the reader can act on it (prepress, admin); others read what prepress is asked to do. */
export function FontsNotEmbedded({ revision, mayUpload }: { revision: RevisionView; mayUpload: boolean }) {
  const fonts = revision.preflight?.nonEmbeddedFonts ?? [];
  if (fonts.length === 0) return null;
  const more = fonts.length - NAMES_SHOWN;
  const names = fonts.slice(0, NAMES_SHOWN).join(", ") + (more > 0 ? ` and ${more} more` : "");
  return (
    <Notice tone="caution">
      <span className="font-medium">Fonts not embedded: {names}.</span> The press&rsquo;s RIP and Tympan each put a font of
      their own in place of {fonts.length === 1 ? "this one" : "these"}, so the type may print and compare differently and
      show as false findings on text.{" "}
      {revision.status !== "draft"
        ? "Findings on text in this revision may come from that substitution rather than from the press."
        : mayUpload
          ? "Export the PDF with all fonts embedded (as PDF/X asks) and upload it as a new revision before approving."
          : "Prepress is asked for a PDF with all fonts embedded (as PDF/X asks) before this revision is approved."}
    </Notice>
  );
}
