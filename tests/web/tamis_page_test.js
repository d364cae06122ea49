// Browser tests of the single-file page tamis.html (node's built-in test
// runner), opened from file:// or from a loopback static server:
//   1. it reaches TAMIS_READY with no request beyond the page itself, no
//      Content-Security-Policy violation, and the exact CSP meta;
//   2. the demo session through the data input and script actions exports a
//      CSV byte-identical to `tamis run` of the exported recipe;
//   3. a recipe picked in the recipe input is replayed;
//   4. a file read in many small slices, several at once, arrives whole;
//   5. a file dropped on the page opens like a picked one;
//   6. a table whose duplicate check outgrows the streaming key budget loads;
//   7. a file over the memory budget gets a message, not a crash;
//   8. negative control: the network and CSP checks of test 1 do report a
//      blocked fetch, a blocked image, an uncaught error (which the page
//      shows in its notice) and a real request.
// Every test ends with the page-health check of test 1 (requests, CSP
// violations, uncaught and console errors).
//
// usage: node tamis_page_test.js --origin file|loopback --html TAMIS_HTML --cli TAMIS_CLI
//                                --source SOURCE_DIR --artifacts ARTIFACTS_DIR
"use strict";
const assert = require("node:assert/strict");
const { spawnSync } = require("node:child_process");
const fs = require("node:fs");
const os = require("node:os");
const path = require("node:path");
const { describe, test, before, after, afterEach } = require("node:test");
const { parseArgs } = require("node:util");
const harness = require("./page_harness");

const { values: options } = parseArgs({
  options: {
    origin: { type: "string" }, html: { type: "string" }, cli: { type: "string" },
    source: { type: "string" }, artifacts: { type: "string" },
  },
});
for (const name of ["origin", "html", "cli", "source", "artifacts"]) {
  if (!options[name]) {
    console.error(`missing --${name}; usage: node tamis_page_test.js --origin file|loopback --html TAMIS_HTML ` +
                  "--cli TAMIS_CLI --source SOURCE_DIR --artifacts ARTIFACTS_DIR");
    process.exit(2);
  }
}
if (options.origin !== "file" && options.origin !== "loopback") {
  console.error("--origin must be file or loopback, not " + options.origin);
  process.exit(2);
}
// A missing page or CLI is a failure, never a skip.
for (const [what, file] of [["the page (TAMIS_HTML)", options.html], ["the tamis CLI (TAMIS_CLI)", options.cli]]) {
  if (!fs.existsSync(file)) {
    console.error(`FAIL: ${what} does not exist: ${file}`);
    process.exit(1);
  }
}

const origin = options.origin;
const demoCsv = path.join(options.source, "assets", "demo", "tree_survey.csv");
const demoRecipe = path.join(options.source, "assets", "demo", "tree_survey.recipe.json");
// A small invented survey table with three columns, for the drop and memory tests.
const smallCsv = "site,species,planted_count\nTollbar,Rowan,12\nFen Edge,Crab apple,7\n";

function runCli(args) {
  const run = spawnSync(options.cli, args, { encoding: "utf8" });
  assert.equal(run.status, 0, `tamis ${args.join(" ")} exited with ${run.status}: ${run.stderr}`);
}

function assertHealthy(record) {
  assert.deepEqual(harness.pageFindings(record), [], `the page from ${origin} is not clean`);
}

describe(`tamis.html from ${origin}`, () => {
  let browser, server, work, record;

  before(async () => {
    work = fs.mkdtempSync(path.join(os.tmpdir(), "tamis-web-"));
    fs.mkdirSync(options.artifacts, { recursive: true });
    server = await harness.startServer(options.html);
    browser = await harness.launchChromium();
  });
  afterEach(async () => {
    if (record) await harness.withHangGuard(record.context.close(), "the browser context to close");
    record = undefined;
  });

  // The page's cleaned CSV of the demo after the demo recipe must be the
  // bytes tamis run writes for the same recipe and file.
  async function assertDemoReplayMatchesCli(name) {
    const cleaned = await harness.exportDownload(record, "export-csv", `${name}.clean.csv`, work);
    const replayed = path.join(work, `${name}.tamis-run.csv`);
    runCli(["run", demoRecipe, demoCsv, "-o", replayed]);
    assert.ok(fs.readFileSync(cleaned).equals(fs.readFileSync(replayed)),
              `the page's replay of the demo recipe (${name}) differs from tamis run`);
  }

  after(async () => {
    if (browser) await harness.withHangGuard(browser.close(), "the browser to close");
    if (server) await server.close();
    fs.rmSync(work, { recursive: true, force: true });
  });

  test("loads to TAMIS_READY with no request beyond the page and the exact CSP", async () => {
    record = await harness.openTamis(browser, origin, options.html, server);
    const policies = await record.page.evaluate(() =>
      Array.from(document.querySelectorAll("meta[http-equiv]"))
        .filter((m) => m.httpEquiv.toLowerCase() === "content-security-policy")
        .map((m) => m.content));
    assert.deepEqual(policies, [harness.EXPECTED_CSP], "the page must carry exactly one CSP meta with the agreed policy");
    // The page must also answer actions once it is ready (one that needs no file).
    await harness.mustDo(record, "theme light");
    assertHealthy(record);
  });

  test("demo session through the data input exports what tamis run writes", async () => {
    record = await harness.openTamis(browser, origin, options.html, server);
    await harness.pickFile(record, "tamis-data-input", demoCsv);
    // The open screen shows the picked file: the demo has 10 columns
    // (assets/demo/generate.py), and a wrong count is refused.
    await harness.mustDo(record, "expect-columns 10");
    assert.equal((await harness.action(record, "expect-columns 11")).ok, false, "expect-columns 11 must fail");
    await harness.mustDo(record, "load");
    const shot = path.join(options.artifacts, `web_demo.${origin}.png`);
    const image = harness.pngColourCount(await record.page.screenshot({ path: shot }));
    assert.deepEqual([image.width, image.height], [1280, 800]);
    // A drawn workbench has text, panels and highlights; a blank or one-colour
    // frame means nothing was rendered (common practice, as in tests/desk).
    assert.ok(image.colours >= 20, `the screenshot ${shot} looks blank (${image.colours} colours)`);
    for (let i = 0; i < 3; i++) await harness.mustDo(record, "apply-finding 1");
    await harness.mustDo(record, "similar species");
    await harness.mustDo(record, "merge-group 1");
    await harness.mustDo(record, "expect-steps 4");
    const recipe = await harness.exportDownload(record, "export-recipe", "session.recipe.json", work);
    const cleaned = await harness.exportDownload(record, "export-csv", "session.clean.csv", work);

    const steps = JSON.parse(fs.readFileSync(recipe, "utf8")).steps;
    assert.equal(steps.length, 4);
    assert.equal(steps[3].op, "map_values", "the merged group is the last step");
    assert.equal(steps[3].column, "species");
    // The page and the batch runner are one engine: the same bytes.
    const replayed = path.join(work, "session.tamis-run.csv");
    runCli(["run", recipe, demoCsv, "-o", replayed]);
    const fromPage = fs.readFileSync(cleaned);
    const fromCli = fs.readFileSync(replayed);
    assert.ok(fromPage.equals(fromCli),
              `the page's CSV (${fromPage.length} bytes) differs from tamis run's (${fromCli.length} bytes)`);
    assertHealthy(record);
  });

  test("a recipe picked in the recipe input is replayed on the open file", async () => {
    const stepCount = JSON.parse(fs.readFileSync(demoRecipe, "utf8")).steps.length;
    record = await harness.openTamis(browser, origin, options.html, server);
    await harness.pickFile(record, "tamis-data-input", demoCsv);
    await harness.mustDo(record, "load");
    await harness.pickFile(record, "tamis-recipe-input", demoRecipe);
    await harness.mustDo(record, `expect-steps ${stepCount}`);
    assert.equal((await harness.action(record, `expect-steps ${stepCount + 1}`)).ok, false,
                 "expect-steps with a wrong count must fail");
    await assertDemoReplayMatchesCli("replayed");
    assertHealthy(record);
  });

  test("a file read in many slices, several at once, arrives whole", async () => {
    record = await harness.openTamis(browser, origin, options.html, server);
    // The demo (117 KB) is read in 29 slices of 4 KB, four in flight at a
    // time; every byte must land in its place for the replay to match.
    await record.page.evaluate(() => window.tamis.setReadSliceBytes(4096));
    await harness.pickFile(record, "tamis-data-input", demoCsv);
    await harness.mustDo(record, "load");
    await harness.pickFile(record, "tamis-recipe-input", demoRecipe);
    await assertDemoReplayMatchesCli("sliced");
    assertHealthy(record);
  });

  test("a file dropped on the page opens like a picked one", async () => {
    record = await harness.openTamis(browser, origin, options.html, server);
    assert.equal((await harness.action(record, "expect-columns 3")).ok, false, "no file is open before the drop");
    // A drop as the browser delivers it: dragenter, dragover, drop on the
    // element under the middle of the window, with a File built in the page.
    await record.page.evaluate((text) => {
      const transfer = new DataTransfer();
      transfer.items.add(new File([text], "dropped_survey.csv", { type: "text/csv" }));
      const target = document.elementFromPoint(innerWidth / 2, innerHeight / 2) || document.body;
      for (const type of ["dragenter", "dragover", "drop"])
        target.dispatchEvent(new DragEvent(type, { bubbles: true, cancelable: true, dataTransfer: transfer }));
    }, smallCsv);
    await harness.idle(record);
    await harness.mustDo(record, "expect-columns 3");
    await harness.mustDo(record, "load");
    await harness.mustDo(record, "expect-columns 3");
    assertHealthy(record);
  });

  test("a table too big for the duplicate check's in-memory key budget loads and gets its findings", async () => {
    // 100,000 generated survey rows (assets/demo/generate.py, about 9.8 MB):
    // the keys of distinct rows outgrow the 8 MB a streaming run keeps in
    // memory before it spills to a temporary file, and the page has no file
    // system to spill into (it used to stop drawing here, mid-load).
    const big = path.join(work, "big_survey");
    const generated = spawnSync("/usr/bin/python3", [path.join(options.source, "assets", "demo", "generate.py"),
                                                     "--rows", "100000", "--out-dir", big], { encoding: "utf8" });
    assert.equal(generated.status, 0, "generate.py failed: " + generated.stderr);
    record = await harness.openTamis(browser, origin, options.html, server);
    await harness.pickFile(record, "tamis-data-input", path.join(big, "tree_survey.csv"));
    await harness.mustDo(record, "load");
    await harness.mustDo(record, "apply-finding 1");
    await harness.mustDo(record, "expect-steps 1");
    assertHealthy(record);
  });

  test("a file over the memory budget gets a message pointing to the desktop tools", async () => {
    record = await harness.openTamis(browser, origin, options.html, server);
    // The demo is about 117 KB; 16 KiB is far below it and far above the small file.
    await record.page.evaluate(() => window.tamis.setMemoryBudget(16 * 1024));
    await harness.pickFile(record, "tamis-data-input", demoCsv);
    const message = await record.console.waitFor(
      (l) => l.startsWith("TAMIS_MESSAGE") && /tamis-desk|tamis run/.test(l), "a TAMIS_MESSAGE naming tamis-desk or tamis run");
    assert.match(message, /tamis-desk|tamis run/);
    // The page still answers, and the big file was not opened.
    await harness.mustDo(record, "theme light");
    assert.equal((await harness.action(record, "expect-columns 10")).ok, false, "the refused file must not be open");
    // A file within the budget still opens.
    const small = path.join(work, "small_survey.csv");
    fs.writeFileSync(small, smallCsv);
    await harness.pickFile(record, "tamis-data-input", small);
    await harness.mustDo(record, "expect-columns 3");
    assertHealthy(record);
  });

  test("negative control: the checks report a blocked fetch, a blocked image and a real request", async () => {
    record = await harness.openTamis(browser, origin, options.html, server);
    assert.deepEqual(harness.pageFindings(record), [], "the page must be clean before the control");
    const image = server.base + "/x.png";
    const fetched = await record.page.evaluate(async (src) => {
      const img = document.createElement("img");
      img.src = src;
      document.body.appendChild(img);
      return fetch("https://example.invalid/").then(() => "fetched", (e) => "refused: " + e.message);
    }, image);
    assert.match(fetched, /^refused/, "connect-src 'none' must refuse the fetch");
    // The test's own listener names both directives; the page's log (whose
    // JSON fields the contract leaves open) has a line for each violation.
    for (const directive of ["connect-src", "img-src"])
      await record.console.waitFor((l) => l.startsWith("TEST_CSP_VIOLATION") && l.includes(directive),
                                   "the test listener's report of " + directive);
    await record.console.waitForCount((l) => l.startsWith("TAMIS_CSP_VIOLATION"), 2, "two TAMIS_CSP_VIOLATION lines");
    // An uncaught error (here thrown from a timer, as one from the module's
    // frame loop would be) is reported by the check and shown to the user.
    await record.page.evaluate(() => setTimeout(() => { throw new Error("negative control"); }, 0));
    await record.page.waitForSelector("#tamis-notice:not([hidden])", { timeout: 30000 });
    assert.match(await record.page.textContent("#tamis-notice"), /tamis stopped .*negative control/);
    const cspFindings = harness.pageFindings(record);
    assert.ok(cspFindings.some((f) => f.startsWith("uncaught error") && f.includes("negative control")));
    assert.ok(cspFindings.some((f) => f.startsWith("CSP violation (test listener)") && f.includes("connect-src")));
    assert.ok(cspFindings.some((f) => f.startsWith("CSP violation (test listener)") && f.includes("img-src")));
    assert.ok(cspFindings.filter((f) => f.startsWith("CSP violation (page log)")).length >= 2);
    // A request the policy does not stop (CSP Level 3, form-action: it does
    // not fall back to default-src): the browser's request log and the server
    // must both report it.
    const probe = server.base + "/probe?control=1";
    const sent = record.page.waitForRequest(probe);
    await record.page.evaluate((action) => {
      const form = document.createElement("form");
      form.method = "get";
      form.action = action.split("?")[0];
      const field = document.createElement("input");
      field.name = "control";
      field.value = "1";
      form.appendChild(field);
      document.body.appendChild(form);
      form.submit();
    }, probe);
    await sent;
    await server.received("GET /probe?control=1");
    // Closing the context while the page is still navigating away from the
    // workbench took minutes here (and past CTest's timeout on CI).
    await record.page.waitForURL(probe, { waitUntil: "load" });
    const requestFindings = harness.unexpectedRequests(record);
    assert.ok(requestFindings.includes("browser requested " + probe), JSON.stringify(requestFindings));
    assert.ok(requestFindings.includes("server received GET /probe?control=1"), JSON.stringify(requestFindings));
  });
});
