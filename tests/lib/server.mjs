// A static file server bound to 127.0.0.1: `./build.sh serve` runs it from the
// command line, the browser tests start it in-process on a free port.
// Node built-ins only, so serving needs no npm install.
import { createServer } from "node:http";
import { readFile, stat } from "node:fs/promises";
import { extname, join, normalize, resolve, sep } from "node:path";
import { pathToFileURL } from "node:url";

const TYPES = {
  ".html": "text/html; charset=utf-8",
  ".js": "text/javascript; charset=utf-8",
  ".mjs": "text/javascript; charset=utf-8",
  ".css": "text/css; charset=utf-8",
  ".wasm": "application/wasm", // needed for WebAssembly.instantiateStreaming
  ".json": "application/json; charset=utf-8",
  ".svg": "image/svg+xml",
  ".png": "image/png",
  ".ico": "image/x-icon",
};

/** Serves `dir`; resolves to the listening server once bound. */
export function serveDirectory(dir, port = 0) {
  const root = resolve(dir);
  const server = createServer(async (req, res) => {
    try {
      const path = decodeURIComponent(new URL(req.url, "http://127.0.0.1").pathname);
      let file = normalize(join(root, path));
      if (file !== root && !file.startsWith(root + sep)) throw new Error("outside");
      if ((await stat(file)).isDirectory()) file = join(file, "index.html");
      const body = await readFile(file);
      res.writeHead(200, {
        "Content-Type": TYPES[extname(file)] ?? "application/octet-stream",
        "Cache-Control": "no-cache",
      });
      res.end(body);
    } catch {
      res.writeHead(404, { "Content-Type": "text/plain; charset=utf-8" });
      res.end("not found\n");
    }
  });
  return new Promise((ok, fail) => {
    server.once("error", fail);
    server.listen(port, "127.0.0.1", () => ok(server));
  });
}

async function main(argv) {
  let dir = "dist";
  let port = 8080;
  let checkOnly = false; // bind and let go: tells before a build whether the port is free
  for (let i = 0; i < argv.length; i++) {
    if (argv[i] === "--dir") dir = argv[++i];
    else if (argv[i] === "--port") port = Number(argv[++i]);
    else if (argv[i] === "--check") checkOnly = true;
    else {
      console.error(`server: unknown option ${argv[i]}`);
      process.exit(2);
    }
  }
  try {
    const server = await serveDirectory(dir, port);
    if (checkOnly) return server.close();
    console.log(`chiroptic: serving ${dir} at http://127.0.0.1:${server.address().port}/  (Ctrl-C stops)`);
  } catch (e) {
    if (e.code === "EADDRINUSE") {
      console.error(`chiroptic: port ${port} on 127.0.0.1 is already taken; choose another with --port N`);
    } else if (e.code === "EACCES") {
      console.error(`chiroptic: not allowed to listen on port ${port}; choose one above 1023 with --port N`);
    } else {
      console.error(`chiroptic: cannot serve on port ${port}: ${e.message}`);
    }
    process.exit(1);
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) main(process.argv.slice(2));
