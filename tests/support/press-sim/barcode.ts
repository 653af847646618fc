// EAN-13 bars drawn from the symbology's own tables (GS1 General Specifications, EAN-13 encodation).
const L = ["0001101", "0011001", "0010011", "0111101", "0100011", "0110001", "0101111", "0111011", "0110111", "0001011"];
const G = ["0100111", "0110011", "0011011", "0100001", "0011101", "0111001", "0000101", "0010001", "0001001", "0010111"];
const R = ["1110010", "1100110", "1101100", "1000010", "1011100", "1001110", "1010000", "1000100", "1001000", "1110100"];
const PARITY = ["LLLLLL", "LLGLGG", "LLGGLG", "LLGGGL", "LGLLGG", "LGGLLG", "LGGGLL", "LGLGLG", "LGLGGL", "LGGLGL"];

/** Check digit of the first 12 digits: weights 1, 3, 1, 3 … from the left. */
export function ean13CheckDigit(first12: string): number {
  let sum = 0;
  for (let i = 0; i < 12; i++) sum += Number(first12[i]) * (i % 2 === 0 ? 1 : 3);
  return (10 - (sum % 10)) % 10;
}

/** The 95 modules (1 = bar) of a 13-digit code. */
export function ean13Modules(digits13: string): string {
  if (!/^\d{13}$/.test(digits13)) throw new Error(`EAN-13 needs 13 digits, got "${digits13}"`);
  const parity = PARITY[Number(digits13[0])];
  let m = "101";
  for (let i = 1; i <= 6; i++) m += (parity[i - 1] === "L" ? L : G)[Number(digits13[i])];
  m += "01010";
  for (let i = 7; i <= 12; i++) m += R[Number(digits13[i])];
  return m + "101";
}
