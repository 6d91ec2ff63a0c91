// Writes dist/chiroptic.html: the built page (dist/) in one file that works
// opened from disk, with no server and no network.
//   node www/tools/single.mjs [dist-dir]
// The page's module graph (www/js/ and the wasm-bindgen glue in dist/pkg/)
// is bundled into one inline module by esbuild (pinned in tests/package.json),
// the stylesheet is inlined, the wasm bytes ride along as base64 (core.js
// hands them to the glue), the fit worker rides as inert text, and a
// Content-Security-Policy names the inline script by its hash, lets workers
// start only from blob: URLs and allows no fetch at all.
import { readFileSync, writeFileSync } from "node:fs";
import { createHash } from "node:crypto";
import { createRequire } from "node:module";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const root = resolve(dirname(fileURLToPath(import.meta.url)), "..", "..");
const dist = resolve(process.argv[2] ?? join(root, "dist"));
const fail = (why) => {
  console.error(`single: ${why}`);
  process.exit(1);
};

let esbuild;
try {
  esbuild = createRequire(join(root, "tests", "package.json"))("esbuild");
} catch {
  fail("esbuild is not installed: run `npm ci` in tests/ (build.sh does)");
}

const read = (name) => readFileSync(join(dist, name));
// Text that would end an inline element early.
const inlineSafe = (text, tag) => {
  if (new RegExp(`</${tag}`, "i").test(text)) fail(`${tag} text contains "</${tag}"`);
  if (tag === "script" && text.includes("<!--")) fail('script text contains "<!--"');
  return text;
};
const sha256 = (text) => `'sha256-${createHash("sha256").update(text, "utf8").digest("base64")}'`;

const bundled = await esbuild.build({
  entryPoints: [join(dist, "js", "main.js")],
  bundle: true,
  format: "esm",
  target: "es2022",
  write: false,
  legalComments: "none",
  logLevel: "error",
});
const app = inlineSafe(bundled.outputFiles[0].text, "script");
// The fit worker (www/js/fitworker.js with the glue) as its own script: it
// rides inline as inert text and runs from a blob: URL (fitrun.js); the
// compiled wasm module is posted to it, so it fetches nothing.
const worker = await esbuild.build({
  entryPoints: [join(dist, "js", "fitworker.js")],
  bundle: true,
  // A classic worker: Chromium refuses module workers from a file:// page's blob: URLs.
  format: "iife",
  target: "es2022",
  write: false,
  legalComments: "none",
  logLevel: "error",
});
const workerCode = inlineSafe(worker.outputFiles[0].text, "script");
const css = inlineSafe(read("style.css").toString("utf8"), "style");
const wasm = read("pkg/chiroptic_bg.wasm").toString("base64");

const policy = [
  "default-src 'none'",
  `script-src ${sha256(app)} 'wasm-unsafe-eval'`,
  "worker-src blob:",
  "style-src 'unsafe-inline'",
  "img-src data: blob:",
  "connect-src 'none'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
].join("; ");

let html = read("index.html").toString("utf8");
const swap = (pattern, replacement, what) => {
  if (!pattern.test(html)) fail(`dist/index.html has no ${what}`);
  html = html.replace(pattern, () => replacement);
};
swap(/<meta http-equiv="Content-Security-Policy" content="[^"]*">/, `<meta http-equiv="Content-Security-Policy" content="${policy}">`, "CSP meta tag");
swap(/<link rel="stylesheet" href="style.css">/, `<style>\n${css}</style>`, "stylesheet link");
swap(/<script type="module" src="js\/main.js"><\/script>/, `<script type="module">${app}</script>`, "module script");
swap(
  /<\/body>/,
  `<script type="application/octet-stream" id="chiroptic-wasm">${wasm}</script>\n<script type="text/plain" id="chiroptic-fitworker">${workerCode}</script>\n</body>`,
  "</body>",
);
writeFileSync(join(dist, "chiroptic.html"), html);
console.error(`single: ${join(dist, "chiroptic.html")} (${html.length} bytes)`);
