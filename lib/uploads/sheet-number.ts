// The sheet number is the serial the press prints on every sheet. QA types it, or the scanner software puts it
// into the file name ("sheet-0217.tif", "run3_sheet_217.png", "0217.jpg"). Shared by the route and the page.

const labelled = /sheet[\s_-]*(?:no\.?|nr\.?|number)?[\s_-]*0*(\d{1,9})/i;
const lastNumber = /(\d{1,9})(?!.*\d)/;

/** The sheet number read from a file name, or null when there is no number to read. */
export function sheetNumberFromName(fileName: string): number | null {
  const stem = fileName.replace(/^.*[\\/]/, "").replace(/\.[a-z0-9]{1,5}$/i, "");
  const match = labelled.exec(stem) ?? lastNumber.exec(stem);
  if (!match) return null;
  const value = Number.parseInt(match[1], 10);
  return Number.isSafeInteger(value) && value > 0 ? value : null;
}

/** A typed-in sheet number: a positive whole number, or null when the text is not one. */
export function parseSheetNumber(text: string | null | undefined): number | null {
  const trimmed = (text ?? "").trim();
  if (!/^\d{1,9}$/.test(trimmed)) return null;
  const value = Number.parseInt(trimmed, 10);
  return value > 0 ? value : null;
}
