// Opens tamis's HTML reports in Debian's headless Chromium (through
// puppeteer-core, which never downloads a browser of its own) from file://,
// records every request the page makes, and saves a full-page screenshot of
// each as a test artifact.
//
// A page passes when: the only request is the page itself (no stylesheet,
// font, image or script is fetched from anywhere, file:// included), no
// Content-Security-Policy violation or console error is reported, and the
// page has rendered its charts (inline SVG with a non-empty size).
//
// Usage: node html_in_chromium.js ARTIFACT_DIR PAGE.html...
"use strict";
const path = require("path");
const fs = require("fs");
const puppeteer = require("puppeteer-core");

async function check(browser, file, artifacts) {
  const failures = [];
  const page = await browser.newPage();
  const url = "file://" + path.resolve(file);
  const requests = [];
  page.on("request", (r) => requests.push(r.url()));
  page.on("console", (m) => { if (m.type() === "error") failures.push("console error: " + m.text()); });
  page.on("pageerror", (e) => failures.push("page error: " + e.message));
  await page.evaluateOnNewDocument(() => {
    document.addEventListener("securitypolicyviolation", (e) => console.error("CSP violation: " + e.violatedDirective));
  });
  await page.setViewport({ width: 1280, height: 900 });
  await page.goto(url, { waitUntil: "load" });
  const others = requests.filter((u) => u !== url && !u.startsWith("data:"));
  if (others.length) failures.push("requests beyond the page itself: " + others.join(", "));
  const rendered = await page.evaluate(() => {
    const svgs = Array.from(document.querySelectorAll("svg"));
    const drawn = svgs.filter((s) => { const b = s.getBoundingClientRect(); return b.width > 0 && b.height > 0; });
    return { title: document.title, svgs: svgs.length, drawn: drawn.length, scripts: document.scripts.length };
  });
  if (!rendered.title) failures.push("the page has no title");
  if (rendered.svgs === 0 || rendered.drawn !== rendered.svgs)
    failures.push(`charts not rendered: ${rendered.drawn} of ${rendered.svgs} SVG elements have a size`);
  if (rendered.scripts !== 0) failures.push(`${rendered.scripts} script elements`);
  const shot = path.join(artifacts, path.basename(file, ".html") + ".png");
  await page.screenshot({ path: shot, fullPage: true });
  const size = fs.statSync(shot).size;
  if (size < 10000) failures.push(`screenshot ${shot} is only ${size} bytes: blank page?`);
  console.log(`${path.basename(file)}: ${requests.length} request(s), ${rendered.svgs} charts, title "${rendered.title}", screenshot ${shot} (${size} bytes)`);
  await page.close();
  return failures.map((f) => `${path.basename(file)}: ${f}`);
}

(async () => {
  const [artifacts, ...pages] = process.argv.slice(2);
  if (!artifacts || pages.length === 0) {
    console.error("usage: node html_in_chromium.js ARTIFACT_DIR PAGE.html...");
    process.exit(2);
  }
  fs.mkdirSync(artifacts, { recursive: true });
  const browser = await puppeteer.launch({
    executablePath: "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
           "--disable-sync", "--no-first-run", "--disable-default-apps"],
  });
  let failures = [];
  try {
    for (const file of pages) failures = failures.concat(await check(browser, file, artifacts));
  } finally {
    await browser.close();
  }
  for (const f of failures) console.log("FAIL: " + f);
  console.log(`html_in_chromium: ${pages.length} pages, ${failures.length} failures`);
  process.exit(failures.length ? 1 : 0);
})().catch((e) => { console.error(e); process.exit(1); });
