// Ten design templates of invented brands (cartons and labels). Each draws one up at (x, y) mm; the same seed
// draws the same design, so every up of a sheet is alike, as on a real imposition.
import { barcode, gradient, picture, reversed, smallPrint, table } from "./blocks";
import type { Ink, Painter } from "./painter";
import type { Random } from "./random";

export interface Template {
  name: string;
  widthMm: number;
  heightMm: number;
  draw(p: Painter, x: number, y: number, rng: Random): void;
}

const K: Ink = [0, 0, 0, 1];
const WHITE: Ink = [0, 0, 0, 0];
const code = (rng: Random) => Array.from({ length: 12 }, () => rng.int(0, 9)).join("");

const nutrition: [string, string][] = [
  ["Nutrition per 100 g", ""],
  ["Energy", "1580 kJ"],
  ["Fat", "3.2 g"],
  ["Carbohydrate", "61 g"],
  ["Protein", "11 g"],
  ["Salt", "0.4 g"],
];

export const TEMPLATES: Template[] = [
  {
    name: "tea-carton",
    widthMm: 90,
    heightMm: 130,
    draw(p, x, y, rng) {
      p.rect(x, y, 90, 130, [0.05, 0.02, 0.12, 0]);
      reversed(p, x, y, 90, 24, [0.85, 0.35, 0.9, 0.45], "Harrowfield Tea", 16);
      picture(p, x + 8, y + 30, 74, 44, rng, [0.45, 0.05, 0, 0], [0.55, 0.1, 0.85, 0.15]);
      p.text("Breakfast Blend", x + 8, y + 84, 12, [0.85, 0.35, 0.9, 0.45], p.fonts.serif);
      p.text("40 tea bags  100 g", x + 8, y + 91, 7, K);
      smallPrint(p, x + 8, y + 94, 44, 6, rng);
      barcode(p, x + 54, y + 104, code(rng), 12);
      p.frame(x + 3, y + 27, 84, 100, [0.85, 0.35, 0.9, 0.45], 0.3);
    },
  },
  {
    name: "cereal-box",
    widthMm: 120,
    heightMm: 170,
    draw(p, x, y, rng) {
      gradient(p, x, y, 120, 170, [0, 0.25, 0.9, 0], [0, 0.7, 1, 0.05], true);
      reversed(p, x + 6, y + 8, 108, 26, [0.1, 0.9, 0.95, 0.35], "Mellowgrain Oats", 20, [0, 0.05, 0.3, 0]);
      picture(p, x + 10, y + 42, 100, 70, rng, [0.35, 0, 0.05, 0], [0.3, 0.35, 0.9, 0.1]);
      p.circle(x + 95, y + 120, 12, [0.9, 0.6, 0, 0.1]);
      p.text("NEW", x + 88, y + 122, 10, WHITE, p.fonts.bold);
      p.rect(x + 6, y + 118, 70, 46, WHITE);
      table(p, x + 8, y + 120, 66, nutrition);
      smallPrint(p, x + 8, y + 146, 66, 2, rng);
    },
  },
  {
    name: "medicine-carton",
    widthMm: 60,
    heightMm: 110,
    draw(p, x, y, rng) {
      p.rect(x, y, 60, 110, WHITE);
      p.rect(x, y, 60, 6, [1, 0.6, 0, 0]);
      p.text("Dovrazine 20 mg", x + 4, y + 18, 13, [1, 0.6, 0, 0.2], p.fonts.bold);
      p.text("film-coated tablets", x + 4, y + 24, 7, K);
      p.text("28 tablets", x + 4, y + 30, 7, K, p.fonts.bold);
      gradient(p, x, y + 36, 60, 8, [1, 0.6, 0, 0], [0.2, 0.1, 0, 0]);
      smallPrint(p, x + 4, y + 48, 52, 8, rng);
      table(p, x + 4, y + 72, 52, [["Each tablet contains", ""], ["Active", "20 mg"], ["Lactose", "85 mg"]]);
      p.text("Quillon Pharma Ltd", x + 4, y + 92, 6, K);
      p.text("PL 01234/0567  Lot 4471", x + 4, y + 97, 6, K);
      for (let i = 0; i < 5; i++) p.line(x + 4, y + 100 + i * 1.5, x + 56, y + 100 + i * 1.5, K, 0.2 + i * 0.075);
    },
  },
  {
    name: "wine-label",
    widthMm: 80,
    heightMm: 100,
    draw(p, x, y, rng) {
      p.rect(x, y, 80, 100, [0.02, 0.04, 0.15, 0]);
      p.frame(x + 3, y + 3, 74, 94, [0.3, 0.4, 0.8, 0.2], 0.5);
      p.frame(x + 4.5, y + 4.5, 71, 91, [0.3, 0.4, 0.8, 0.2], 0.2);
      p.text("Castel Oriveau", x + 10, y + 22, 15, [0.3, 1, 0.7, 0.35], p.fonts.serif);
      p.text("Grande Réserve 2024", x + 16, y + 30, 8, K, p.fonts.serif);
      picture(p, x + 12, y + 36, 56, 34, rng, [0.25, 0.1, 0, 0], [0.5, 0.3, 0.9, 0.3]);
      reversed(p, x + 12, y + 74, 56, 9, [0.3, 1, 0.7, 0.35], "13.5% vol   75 cl", 8);
      smallPrint(p, x + 12, y + 84, 56, 2, rng);
    },
  },
  {
    name: "chocolate-wrapper",
    widthMm: 150,
    heightMm: 70,
    draw(p, x, y, rng) {
      p.rect(x, y, 150, 70, [0.3, 0.75, 0.9, 0.55]);
      gradient(p, x, y + 52, 150, 18, [0.3, 0.75, 0.9, 0.55], [0.1, 0.35, 0.6, 0.05]);
      p.text("Brunholt Cocoa", x + 8, y + 20, 20, [0, 0.1, 0.4, 0], p.fonts.serif);
      p.text("70% dark chocolate  100 g", x + 8, y + 28, 8, [0, 0.05, 0.2, 0]);
      smallPrint(p, x + 8, y + 32, 60, 3, rng, [0, 0.05, 0.2, 0]);
      picture(p, x + 92, y + 6, 50, 40, rng, [0.1, 0.3, 0.5, 0], [0.35, 0.7, 0.9, 0.4]);
      barcode(p, x + 8, y + 48, code(rng), 12);
    },
  },
  {
    name: "cosmetic-label",
    widthMm: 50,
    heightMm: 120,
    draw(p, x, y, rng) {
      gradient(p, x, y, 50, 120, [0.02, 0.12, 0.02, 0], [0.2, 0.45, 0.05, 0], true);
      p.text("Lysandre", x + 6, y + 20, 16, [0.6, 0.9, 0.2, 0.3], p.fonts.serif);
      p.text("hydrating serum 30 ml", x + 6, y + 27, 7, K);
      for (let i = 0; i < 8; i++) p.circle(x + 10 + i * 4.3, y + 40 + 4 * Math.sin(i), 1.2 + 0.3 * i, [0.6, 0.9, 0.2, 0.3 * (i % 2)]);
      smallPrint(p, x + 5, y + 52, 40, 14, rng, [0.6, 0.9, 0.2, 0.5]);
      p.text("Ingredients", x + 5, y + 51, 6, K, p.fonts.bold, 0);
      reversed(p, x, y + 108, 50, 12, [0.6, 0.9, 0.2, 0.3], "LYSANDRE.EXAMPLE", 7);
    },
  },
  {
    name: "coffee-label",
    widthMm: 100,
    heightMm: 100,
    draw(p, x, y, rng) {
      p.rect(x, y, 100, 100, [0.5, 0.6, 0.7, 0.85]);
      p.text("Okonto", x + 10, y + 24, 26, [0, 0.3, 0.9, 0], p.fonts.bold);
      p.text("Roasters  single origin", x + 10, y + 32, 9, WHITE);
      picture(p, x + 10, y + 38, 80, 30, rng, [0.6, 0.2, 0, 0], [0.6, 0.35, 0.9, 0.4]);
      p.text("WHOLE BEAN 250 g", x + 10, y + 76, 9, WHITE, p.fonts.bold);
      smallPrint(p, x + 10, y + 79, 50, 3, rng, WHITE);
      barcode(p, x + 64, y + 78, code(rng), 10, 0.27);
      p.text("ROAST 04.11", x + 92, y + 70, 6, WHITE, p.fonts.regular, 90);
    },
  },
  {
    name: "juice-label",
    widthMm: 180,
    heightMm: 60,
    draw(p, x, y, rng) {
      p.rect(x, y, 180, 60, [0, 0.05, 0.25, 0]);
      gradient(p, x, y, 60, 60, [0, 0.55, 1, 0], [0, 0.2, 0.9, 0]);
      p.text("Pellamy Orchard", x + 66, y + 20, 18, [0.8, 0.2, 1, 0.2], p.fonts.serif);
      p.text("pressed apple & pear 1 L", x + 66, y + 28, 9, K);
      picture(p, x + 4, y + 6, 52, 48, rng, [0.3, 0, 0, 0], [0.5, 0.05, 0.95, 0.1]);
      table(p, x + 66, y + 32, 60, nutrition.slice(0, 4));
      barcode(p, x + 132, y + 34, code(rng), 14);
      smallPrint(p, x + 132, y + 8, 44, 3, rng);
    },
  },
  {
    name: "detergent-carton",
    widthMm: 110,
    heightMm: 150,
    draw(p, x, y, rng) {
      p.rect(x, y, 110, 150, [1, 0.7, 0, 0.1]);
      gradient(p, x, y + 60, 110, 40, [1, 0.7, 0, 0.1], [0.3, 0, 0, 0], true);
      p.text("Brightwell", x + 10, y + 28, 24, [0, 0, 0.9, 0], p.fonts.bold);
      p.text("CLEAN", x + 10, y + 40, 14, WHITE, p.fonts.bold);
      for (let i = 0; i < 6; i++) p.circle(x + 70 + i * 6, y + 80 - i * 3, 3 + i, [0.15 * (i % 3), 0, 0, 0]);
      p.rect(x + 8, y + 104, 94, 40, WHITE);
      smallPrint(p, x + 10, y + 105, 56, 5, rng);
      barcode(p, x + 68, y + 110, code(rng), 10, 0.26);
      table(p, x + 10, y + 125, 56, [["Dose", "ml"], ["Light", "35"], ["Heavy", "60"]]);
    },
  },
  {
    name: "spice-label",
    widthMm: 70,
    heightMm: 45,
    draw(p, x, y, rng) {
      p.rect(x, y, 70, 45, [0, 0.45, 0.95, 0.2]);
      reversed(p, x, y, 70, 12, [0, 0, 0, 0.9], "Saffrey Spice Co.", 9, [0, 0.3, 0.9, 0]);
      p.text("Smoked paprika 42 g", x + 4, y + 20, 8, K, p.fonts.bold);
      smallPrint(p, x + 4, y + 22, 40, 3, rng);
      picture(p, x + 46, y + 15, 20, 16, rng, [0, 0.2, 0.4, 0], [0, 0.8, 1, 0.3]);
      for (let i = 0; i < 4; i++) p.line(x + 4, y + 36 + i * 1.6, x + 66, y + 36 + i * 1.6, K, 0.2 + 0.1 * i);
    },
  },
  {
    name: "pet-food",
    widthMm: 100,
    heightMm: 140,
    draw(p, x, y, rng) {
      p.rect(x, y, 100, 140, [0.7, 0.1, 0.4, 0.05]);
      reversed(p, x, y + 6, 100, 20, [0.9, 0.5, 0.6, 0.6], "Tallowby Pet", 18);
      picture(p, x + 6, y + 32, 88, 60, rng, [0.4, 0, 0.1, 0], [0.4, 0.5, 0.8, 0.3]);
      p.text("Adult dog  chicken & rice  2 kg", x + 6, y + 100, 9, K, p.fonts.bold);
      table(p, x + 6, y + 104, 54, [["Analytical", "%"], ["Protein", "24"], ["Fat", "12"], ["Fibre", "3"]]);
      barcode(p, x + 64, y + 110, code(rng), 12, 0.27);
      smallPrint(p, x + 6, y + 128, 88, 1, rng);
    },
  },
];

export function templateByName(name: string): Template {
  const t = TEMPLATES.find((t) => t.name === name);
  if (!t) throw new Error(`No template "${name}"`);
  return t;
}
