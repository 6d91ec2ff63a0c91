// Shared set-up of the browser tests, the timing script and the screenshot
// script: serve dist/ on 127.0.0.1, start Debian's headless Chromium with the
// flags this workplace requires, and watch every console message and request.
import { before, after, afterEach } from "node:test";
import assert from "node:assert/strict";
import { chromium } from "playwright-core";
import { join, resolve, dirname } from "node:path";
import { fileURLToPath } from "node:url";
import { serveDirectory } from "./server.mjs";

const here = dirname(fileURLToPath(import.meta.url));
export const ROOT = resolve(here, "..", "..");
export const DIST = process.env.CHIROPTIC_DIST ?? join(ROOT, "dist");
export const CLI = process.env.CHIROPTIC_CLI ?? join(ROOT, "target", "debug", "chiroptic");
export const DEMO = join(ROOT, "fixtures", "demo", "demo.json");

/** Starts the server and the browser; `close()` ends both. */
export async function startBrowser() {
  const server = await serveDirectory(DIST, 0);
  const origin = `http://127.0.0.1:${server.address().port}`;
  // launch() gives Chromium a new empty --user-data-dir of its own (and refuses
  // the flag), which is what the workplace rules ask for.
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
  return {
    origin,
    browser,
    /** Logs of the pages opened since the last check (see browserTests). */
    logs: [],
    async close() {
      await browser.close();
      await new Promise((ok) => server.close(ok));
    },
  };
}

/**
 * Opens the page and waits until the first plots are drawn. Every console
 * error, page error and request is recorded; requests that leave 127.0.0.1
 * are refused and listed in `foreign`.
 */
export async function openPage(env, { width = 1280, height = 800, colorScheme = "light", path = "/", deviceScaleFactor = 1, context: given } = {}) {
  const context = given ?? (await env.browser.newContext({ viewport: { width, height }, colorScheme, acceptDownloads: true, deviceScaleFactor }));
  const page = await context.newPage();
  const log = { errors: [], requests: [], foreign: [] };
  page.on("console", (m) => {
    if (m.type() === "error") log.errors.push(m.text());
  });
  page.on("pageerror", (e) => log.errors.push(`page error: ${e.message}`));
  env.logs?.push(log);
  if (!given) await routeLocal(context, log);
  await page.goto(env.origin + path);
  try {
    await page.waitForSelector("html[data-ready=true]", { state: "attached", timeout: 20000 });
  } catch (e) {
    const fatal = await page.textContent("#fatal").catch(() => "");
    throw new Error(`the page did not start: ${fatal || "no message"}; console: ${log.errors.join(" | ")}`);
  }
  looksAfterEachInput(page);
  return { page, context, log };
}

/**
 * The page applies typed and dragged changes in the next animation frame;
 * a person sees the result after that frame, and so do the tests: each key,
 * fill and mouse release is followed by two frames before the test goes on.
 */
function looksAfterEachInput(page) {
  const settle = () => page.evaluate(() => new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok)))).catch(() => {});
  const after = (target, name) => {
    const original = target[name].bind(target);
    target[name] = async (...args) => {
      const out = await original(...args);
      await settle();
      return out;
    };
  };
  for (const name of ["type", "press", "insertText", "up"]) after(name === "up" ? page.mouse : page.keyboard, name);
  for (const name of ["fill", "type", "press", "dragAndDrop"]) after(page, name);
}

/**
 * The set-up of a browser test file: one browser and server for the file,
 * and after every test a check that no page it opened logged a console or
 * page error or asked for anything off 127.0.0.1. Returns the environment
 * (filled in before the first test).
 */
export function browserTests() {
  const env = {};
  before(async () => Object.assign(env, await startBrowser()));
  after(async () => env.close && (await env.close()));
  afterEach(() => {
    const logs = env.logs.splice(0);
    for (const log of logs) {
      assert.deepEqual(log.errors, [], "no console or page error");
      assert.deepEqual(log.foreign, [], "no request off 127.0.0.1");
    }
  });
  return env;
}

/** Lets requests to 127.0.0.1 (and blob:/data:) through; records and refuses the rest. */
async function routeLocal(context, log) {
  await context.route("**/*", (route) => {
    const url = new URL(route.request().url());
    log.requests.push(url.href);
    const local = url.protocol === "blob:" || url.protocol === "data:" || url.hostname === "127.0.0.1";
    if (local) return route.continue();
    log.foreign.push(url.href);
    return route.abort();
  });
}

/** A digest of a canvas's pixels, and how many differ from the background. */
export async function canvasDigest(page, id) {
  return page.evaluate((id) => {
    const c = document.getElementById(id);
    const data = c.getContext("2d").getImageData(0, 0, c.width, c.height).data;
    const [r0, g0, b0] = data;
    let inked = 0;
    let hash = 2166136261;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i] !== r0 || data[i + 1] !== g0 || data[i + 2] !== b0) inked++;
      hash = Math.imul(hash ^ data[i] ^ (data[i + 1] << 8) ^ (data[i + 2] << 16), 16777619) >>> 0;
    }
    return { width: c.width, height: c.height, inked, hash };
  }, id);
}
