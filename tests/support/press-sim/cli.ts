// `npm run press-sim -- --out DIR --seeds A-B [--dpi 300] [--clean-share 0.4]`: one folder per seed with
// artwork.pdf, the scan and truth.json. A case is written to a temporary folder and renamed when whole.
import { mkdir, rename, rm, writeFile } from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import { makeCase } from "./case";
import { parseSeeds } from "./seeds";

async function main(): Promise<number> {
  const { values } = parseArgs({
    options: { out: { type: "string" }, seeds: { type: "string" }, dpi: { type: "string" }, "clean-share": { type: "string" } },
  });
  if (!values.out || !values.seeds) {
    console.error("Usage: npm run press-sim -- --out DIR --seeds A-B [--dpi 300|200|100] [--clean-share 0.4]");
    return 2;
  }
  const seeds = parseSeeds(values.seeds);
  const dpi = values.dpi === undefined ? undefined : Number(values.dpi);
  if (dpi !== undefined && ![100, 200, 300].includes(dpi)) throw new Error("--dpi must be 100, 200 or 300");
  const cleanShare = values["clean-share"] === undefined ? undefined : Number(values["clean-share"]);
  if (cleanShare !== undefined && !(cleanShare >= 0 && cleanShare <= 1)) throw new Error("--clean-share must be between 0 and 1");
  await mkdir(values.out, { recursive: true });
  for (const seed of seeds) {
    const started = performance.now();
    const c = await makeCase(seed, { dpi, cleanShare });
    const dir = path.join(values.out, `case-${seed}`), temp = `${dir}.partial`;
    await rm(temp, { recursive: true, force: true });
    await mkdir(temp);
    await writeFile(path.join(temp, "artwork.pdf"), c.artworkPdf);
    await writeFile(path.join(temp, c.truth.scan_file), c.scan);
    await writeFile(path.join(temp, "truth.json"), JSON.stringify(c.truth, null, 2) + "\n");
    await rm(dir, { recursive: true, force: true });
    await rename(temp, dir);
    const t = c.truth;
    console.log(`case-${seed}: ${t.template} ${t.ups.rows}x${t.ups.columns} at ${t.dpi} dpi, ${t.format}, ` +
      `${t.expect === "refuse" ? `refuse (${t.refuse_reason})` : t.clean ? "clean" : `${t.defects.length} defects`}${t.partial ? ", partial" : ""} ` +
      `(${((performance.now() - started) / 1000).toFixed(1)} s)`);
  }
  return 0;
}

main().then((code) => (process.exitCode = code), (err) => {
  console.error(`error: ${(err as Error).message}`);
  process.exitCode = 2;
});
