// Drives the single-file page tamis.html in Debian's headless Chromium
// through playwright-core (which never downloads a browser of its own) and
// records everything a test needs to judge the page: every request, every
// Content-Security-Policy violation (seen by a listener the test installs
// before the page's scripts run, and by the page's own TAMIS_CSP_VIOLATION
// log), uncaught errors, console errors and TAMIS_MESSAGE lines.
//
// The page is opened either from file:// or from a static server on
// 127.0.0.1 that serves the page and nothing else and logs every request it
// receives, so a request is caught both in the browser and on the wire.
"use strict";
const fs = require("fs");
const http = require("http");
const path = require("path");
const zlib = require("zlib");

function loadPlaywright() {
  try {
    return require("playwright-core");
  } catch (error) {
    throw new Error("playwright-core is missing in tests/web/node_modules: run ./dev.sh install " +
                    "(npm ci in tests/web) (" + error.message + ")");
  }
}

// The policy the page must carry in its CSP meta element, exactly.
const EXPECTED_CSP = "default-src 'none'; script-src 'unsafe-inline' 'wasm-unsafe-eval'; " +
                     "style-src 'unsafe-inline'; img-src data: blob:; connect-src 'none'";

// Hang guard only: a page that never answers fails with a message naming the
// step instead of being killed by CTest. No test asserts how long anything takes.
// Benchmarks on large files may allow longer (TAMIS_WEB_HANG_MS).
const HANG_GUARD_MS = Number(process.env.TAMIS_WEB_HANG_MS) || 300000;

const CHROMIUM = "/usr/bin/chromium";

async function launchChromium() {
  if (!fs.existsSync(CHROMIUM)) throw new Error(CHROMIUM + " is missing: install Debian's chromium (./dev.sh install)");
  const { chromium } = loadPlaywright();
  // WebGL 2 without a GPU: ANGLE on SwiftShader (shared/toolchain.md 2d).
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: ["--no-sandbox", "--enable-unsafe-swiftshader", "--use-angle=swiftshader",
           "--disable-background-networking", "--disable-component-update", "--disable-sync",
           "--no-first-run", "--disable-default-apps"],
  });
}

// A static server on a random loopback port serving HTML_FILE as /tamis.html
// and a plain page at /probe (the negative control's target). Everything it
// receives is appended to server.log as "METHOD /path"; server.received(LINE)
// resolves once that line is in the log.
function startServer(htmlFile) {
  const log = [];
  const waiters = [];
  const server = http.createServer((request, response) => {
    const line = request.method + " " + request.url;
    log.push(line);
    for (const waiter of waiters.filter((w) => w.line === line)) waiter.resolve();
    const route = request.url.split("?")[0];
    if (route === "/tamis.html") {
      response.writeHead(200, { "Content-Type": "text/html; charset=utf-8" });
      fs.createReadStream(htmlFile).pipe(response);
    } else if (route === "/probe") {
      response.writeHead(200, { "Content-Type": "text/html; charset=utf-8" });
      response.end("<!doctype html><title>probe</title>");
    } else {
      response.writeHead(404);
      response.end();
    }
  });
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const base = "http://127.0.0.1:" + server.address().port;
      const received = (line) => log.includes(line) ? Promise.resolve()
        : withHangGuard(new Promise((done) => waiters.push({ line, resolve: done })), "the server to receive " + line);
      resolve({ base, log, received, close: () => new Promise((done) => {
        // Idle keep-alive connections would hold the server (and the test) open.
        server.close(done);
        server.closeAllConnections();
      }) });
    });
  });
}

function withHangGuard(promise, what) {
  let timer;
  const guard = new Promise((_, reject) => {
    timer = setTimeout(() => reject(new Error("gave up waiting for " + what)), HANG_GUARD_MS);
  });
  return Promise.race([promise, guard]).finally(() => clearTimeout(timer));
}

// Console lines of the page, kept in order, with a way to wait for one that
// may already have arrived.
class ConsoleLines {
  constructor() {
    this.lines = [];
    this.waiters = [];
  }
  push(line) {
    this.lines.push(line);
    for (const waiter of this.waiters.slice()) {
      if (waiter.match(line)) {
        this.waiters.splice(this.waiters.indexOf(waiter), 1);
        waiter.resolve(line);
      }
    }
  }
  // Lines starting with PREFIX, with the prefix and one space removed.
  withPrefix(prefix) {
    return this.lines.filter((l) => l.startsWith(prefix)).map((l) => l.slice(prefix.length).trim());
  }
  waitFor(match, what) {
    return this.waitForCount(match, 1, what);
  }
  // Resolves with the COUNT-th line that MATCH accepts.
  waitForCount(match, count, what) {
    let seen = this.lines.filter(match);
    if (seen.length >= count) return Promise.resolve(seen[count - 1]);
    let missing = count - seen.length;
    const counting = (line) => match(line) && --missing === 0;
    return withHangGuard(new Promise((resolve) => this.waiters.push({ match: counting, resolve })), what);
  }
}

// Opens the page in a fresh browser context. ORIGIN is "file" or "loopback";
// SERVER is the running static server (its log is checked in both cases:
// from file:// it must receive nothing). Resolves once TAMIS_READY is logged.
async function openTamis(browser, origin, htmlFile, server) {
  const url = origin === "file" ? "file://" + path.resolve(htmlFile) : server.base + "/tamis.html";
  const context = await browser.newContext({ acceptDownloads: true, viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  const record = {
    origin, url, page, context, server,
    serverLogStart: server.log.length,
    requests: [],
    console: new ConsoleLines(),
    pageErrors: [],
    consoleErrors: [],
  };
  // Every request of the context: the page, its frames and its workers.
  context.on("request", (r) => record.requests.push(r.url()));
  page.on("pageerror", (e) => record.pageErrors.push(e.message));
  page.on("console", (m) => {
    if (m.type() === "error") record.consoleErrors.push(m.text());
    record.console.push(m.text());
  });
  // Installed before any script of the page runs, so it sees violations the
  // page's own listener might miss (or never install).
  await context.addInitScript(() => {
    document.addEventListener("securitypolicyviolation", (e) => {
      console.log("TEST_CSP_VIOLATION " + JSON.stringify({
        directive: e.violatedDirective, blocked: e.blockedURI, source: e.sourceFile, line: e.lineNumber }));
    }, true);
  });
  await page.goto(url, { waitUntil: "load" });
  await record.console.waitFor((l) => l.trim() === "TAMIS_READY", "TAMIS_READY from " + url);
  return record;
}

function isInPage(url) {
  // data: and blob: URLs are resolved inside the page and never leave it.
  return url.startsWith("data:") || url.startsWith("blob:");
}

// Requests that the page should not have made: from file:// anything but the
// page itself, from loopback anything after the page's own document request;
// and on the wire, anything the server received beyond that document.
function unexpectedRequests(record) {
  const found = [];
  const outside = record.requests.filter((u) => !isInPage(u));
  if (outside[0] !== record.url) found.push("the first request is " + outside[0] + ", not the page " + record.url);
  for (const u of outside.slice(1)) found.push("browser requested " + u);
  const received = record.server.log.slice(record.serverLogStart);
  const expected = record.origin === "file" ? [] : ["GET /tamis.html"];
  const extra = received.slice();
  for (const e of expected) {
    const at = extra.indexOf(e);
    if (at < 0) found.push("the server never received " + e);
    else extra.splice(at, 1);
  }
  for (const r of extra) found.push("server received " + r);
  return found;
}

// Everything that must never happen on a healthy page; empty when healthy.
function pageFindings(record) {
  const found = [];
  for (const v of record.console.withPrefix("TEST_CSP_VIOLATION")) found.push("CSP violation (test listener): " + v);
  for (const v of record.console.withPrefix("TAMIS_CSP_VIOLATION")) found.push("CSP violation (page log): " + v);
  for (const e of record.pageErrors) found.push("uncaught error: " + e);
  for (const e of record.consoleErrors) found.push("console error: " + e);
  for (const r of unexpectedRequests(record)) found.push(r);
  return found;
}

// window.tamis.action(LINE): checks the shape of the answer and returns it.
async function action(record, line) {
  const result = await withHangGuard(record.page.evaluate((l) => window.tamis.action(l), line), "action " + line);
  if (typeof result !== "object" || result === null || typeof result.ok !== "boolean" ||
      typeof result.message !== "string")
    throw new Error("action " + line + " answered " + JSON.stringify(result) + ", not {ok, message}");
  return result;
}

async function mustDo(record, line) {
  const result = await action(record, line);
  if (!result.ok) throw new Error("action " + line + " failed: " + result.message);
  return result;
}

async function idle(record) {
  await withHangGuard(record.page.evaluate(() => window.tamis.idle()), "window.tamis.idle()");
}

// Runs an export action and saves the browser download it starts into DIR.
// The download must carry NAME, the file name given in the action.
async function exportDownload(record, verb, name, dir) {
  const download = record.page.waitForEvent("download", { timeout: HANG_GUARD_MS });
  download.catch(() => {});
  await mustDo(record, verb + " " + name);
  const file = await download;
  if (file.suggestedFilename() !== name)
    throw new Error(verb + " downloaded " + file.suggestedFilename() + ", not " + name);
  const target = path.join(dir, name);
  await file.saveAs(target);
  return target;
}

// Picks FILE in one of the page's file inputs, as the file picker would, and
// waits until the page has read it and finished the work it started.
async function pickFile(record, inputId, file) {
  await record.page.setInputFiles("#" + inputId, file);
  await idle(record);
}

// Decodes an 8-bit RGB/RGBA, non-interlaced PNG (the format of Chromium's
// screenshots; filters per the PNG specification, ISO/IEC 15948 section 9)
// and counts the distinct colours on a grid of every STEP-th pixel.
function pngColourCount(buffer, step = 8) {
  if (buffer.subarray(0, 8).toString("binary") !== "\x89PNG\r\n\x1a\n") throw new Error("not a PNG");
  let pos = 8, width = 0, height = 0, channels = 0;
  const idat = [];
  while (pos < buffer.length) {
    const length = buffer.readUInt32BE(pos);
    const kind = buffer.toString("ascii", pos + 4, pos + 8);
    const body = buffer.subarray(pos + 8, pos + 8 + length);
    if (kind === "IHDR") {
      width = body.readUInt32BE(0);
      height = body.readUInt32BE(4);
      const depth = body[8], colour = body[9], interlace = body[12];
      if (depth !== 8 || (colour !== 2 && colour !== 6) || interlace !== 0)
        throw new Error(`unexpected PNG format: depth ${depth}, colour type ${colour}, interlace ${interlace}`);
      channels = colour === 2 ? 3 : 4;
    } else if (kind === "IDAT") {
      idat.push(body);
    }
    pos += 12 + length;
  }
  const raw = zlib.inflateSync(Buffer.concat(idat));
  const stride = width * channels;
  let previous = Buffer.alloc(stride);
  const colours = new Set();
  for (let y = 0; y < height; y++) {
    const filter = raw[y * (stride + 1)];
    const line = Buffer.from(raw.subarray(y * (stride + 1) + 1, (y + 1) * (stride + 1)));
    for (let x = 0; x < stride; x++) {
      const left = x >= channels ? line[x - channels] : 0;
      const up = previous[x];
      const upLeft = x >= channels ? previous[x - channels] : 0;
      let predictor = 0;
      if (filter === 1) predictor = left;
      else if (filter === 2) predictor = up;
      else if (filter === 3) predictor = (left + up) >> 1;
      else if (filter === 4) {
        const p = left + up - upLeft;
        const pa = Math.abs(p - left), pb = Math.abs(p - up), pc = Math.abs(p - upLeft);
        predictor = pa <= pb && pa <= pc ? left : pb <= pc ? up : upLeft;
      }
      line[x] = (line[x] + predictor) & 0xff;
    }
    if (y % step === 0)
      for (let x = 0; x < stride; x += channels * step) colours.add(line.readUIntBE(x, 3));
    previous = line;
  }
  return { width, height, colours: colours.size };
}

module.exports = {
  EXPECTED_CSP, launchChromium, startServer, openTamis, unexpectedRequests, pageFindings,
  action, mustDo, idle, exportDownload, pickFile, pngColourCount, withHangGuard,
};
