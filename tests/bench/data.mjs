// In-page timing of the measured-data path (not a test): import of a
// 100,000-line delimited file and of a 20,000-point DIF/DUP JCAMP-DX file
// (preview + data-set entry, as a dropped file goes), and Kramers-Kronig of a
// 4,000-point CD set onto its 4,000 points (the "Predict ORD" call, which
// also validates and processes the document). Targets (issue 9): < 100 ms
// for either import, < 20 ms for Kramers-Kronig. Also the share-link length
// of the demo with a 1000-point CD set. Run after ./build.sh:
//   node tests/bench/data.mjs
// The data are invented: two Gaussian bands of opposite sign.
import { execFileSync } from "node:child_process";
import { startBrowser, openPage, ROOT } from "../lib/harness.mjs";

const RUNS = 15;

function csv(lines, first, step) {
  const rows = ["wavelength (nm),CD (mdeg)"];
  for (let i = 0; i < lines; i++) {
    const x = first + i * step;
    const y = 30 * Math.exp(-(((x - 230) / 12) ** 2)) - 18 * Math.exp(-(((x - 280) / 20) ** 2));
    rows.push(`${x.toFixed(4)},${y.toFixed(4)}`);
  }
  return rows.join("\n") + "\n";
}

const jcamp = execFileSync("cargo", ["run", "-q", "-p", "chiroptic", "--example", "dif_dup_file"], { cwd: ROOT, encoding: "utf8", maxBuffer: 1 << 26 });
const files = {
  "delimited, 100,000 lines": ["big.csv", csv(100_000, 190, 0.003)],
  "JCAMP-DX DIF/DUP, 20,000 points": ["big.jdx", jcamp],
};

const env = await startBrowser();
const { page } = await openPage(env);
const median = (v) => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)];
for (const [label, [name, text]] of Object.entries(files)) {
  const ms = await page.evaluate(
    async ({ name, text, runs }) => {
      const core = await import("/js/core.js");
      const doc = window.chiroptic.document();
      const out = [];
      for (let k = 0; k < runs; k++) {
        const t0 = performance.now();
        const p = core.importPreview(text, name);
        const r = core.importDataSet(doc, text, name, null);
        out.push(performance.now() - t0);
        if (!p.ok || !r.ok) throw new Error((p.error ?? r.error).message);
      }
      return out;
    },
    { name, text, runs: RUNS },
  );
  console.log(`import, ${label} (${(text.length / 1024).toFixed(0)} kB): median ${median(ms).toFixed(1)} ms, best ${Math.min(...ms).toFixed(1)} ms`);
}

const kk = await page.evaluate(async ({ text, runs }) => {
  const core = await import("/js/core.js");
  const doc = window.chiroptic.document();
  const r = core.importDataSet(doc, text, "cd4000.csv", null);
  doc.data = [r.set];
  const out = [];
  for (let k = 0; k < runs; k++) {
    const t0 = performance.now();
    const p = core.kkPredict(doc, 0);
    out.push(performance.now() - t0);
    if (!p.ok) throw new Error(p.error.message);
  }
  return out;
}, { text: csv(4000, 190, 0.1), runs: RUNS });
console.log(`Kramers-Kronig, 4,000 points onto 4,000 (Predict ORD call): median ${median(kk).toFixed(1)} ms, best ${Math.min(...kk).toFixed(1)} ms`);

const link = await page.evaluate(async ({ text }) => {
  const core = await import("/js/core.js");
  const doc = window.chiroptic.document();
  doc.data = [core.importDataSet(doc, text, "cd1000.csv", null).set];
  const r = core.linkSize(doc);
  return [r.chars, r.limit];
}, { text: csv(1000, 190, 0.5) });
console.log(`share link, demo + 1000-point CD set (4 decimals, even axis): ${link[0]} characters (cap ${link[1]})`);
await env.close();
