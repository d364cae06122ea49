// Times the single-file page tamis.html in Debian's headless Chromium (not a
// test; CTest never runs it). Per round, in a fresh browser context:
//   ready    page load until the first frame (the page's TAMIS_TIMING first-frame)
//   pick     the test tool handing the large file to the data input, until
//            the input's change event (a person's file dialog; page only)
//   open     from that change event until the page is idle (the file read in
//            slices into the WebAssembly heap, the open screen)
//   load     the `load` action until idle (loading and profiling)
//   recipe   picking the recipe in the recipe input until idle (replay)
//   loaded   once loaded, in MB: the page's WebAssembly memory (it only
//            grows, so it is the peak so far; the file as read is in it); the
//            desktop's peak resident memory (VmHWM: the whole process, Mesa's
//            software renderer included)
//   memory   the same at the end, after the recipe
// It prints every round and the median of each phase. The machine is shared
// and its speed varies, so with --desk the same rounds run the native desktop
// program too (tamis-desk --timings --script, under xvfb-run with Mesa's
// software OpenGL, one round after each page round) and the page/desktop
// ratio of each phase is printed: the reference is measured in the same run.
//
// usage: node tests/bench/web_bench.js TAMIS_HTML LARGE.csv [RECIPE.json] [--rounds N] [--desk TAMIS_DESK]
//   RECIPE defaults to the demo recipe (assets/demo/tree_survey.recipe.json);
//   a large file with the demo's columns: assets/demo/generate.py --rows N --out-dir DIR
// Needs playwright-core from tests/web (./dev.sh install, or npm ci in tests/web).
"use strict";
const { spawnSync } = require("child_process");
const fs = require("fs");
const os = require("os");
const path = require("path");
const { parseArgs } = require("util");
const harness = require("../web/page_harness");

const { values, positionals } = parseArgs({
  allowPositionals: true,
  options: { rounds: { type: "string", default: "3" }, desk: { type: "string" } },
});
const [html, large, recipe = path.join(__dirname, "..", "..", "assets", "demo", "tree_survey.recipe.json")] = positionals;
const rounds = Number(values.rounds);
if (!html || !large || !(rounds >= 1)) {
  console.error("usage: node tests/bench/web_bench.js TAMIS_HTML LARGE.csv [RECIPE.json] [--rounds N] [--desk TAMIS_DESK]");
  process.exit(2);
}
for (const file of [html, large, recipe, ...(values.desk ? [values.desk] : [])]) {
  if (!fs.existsSync(file)) {
    console.error("missing: " + file);
    process.exit(2);
  }
}

// gap: the longest time between two frames during load.
const phases = ["ready", "pick", "open", "load", "gap", "loaded", "recipe", "memory"];
const isMemory = (phase) => phase === "loaded" || phase === "memory";
const unit = (phase) => (isMemory(phase) ? "MB" : "s");

async function timed(work) {
  const start = process.hrtime.bigint();
  await work();
  return Number(process.hrtime.bigint() - start) / 1e9;
}

async function round(browser, server) {
  const times = {};
  let record;
  record = await harness.openTamis(browser, "file", html, server);
  // From the start of the page's navigation to its first frame, as the page
  // measures it (performance.now()); Chromium's own start of a tab is not in it.
  const firstFrame = record.console.withPrefix("TAMIS_TIMING first-frame");
  if (firstFrame.length !== 1) throw new Error("the page logged no TAMIS_TIMING first-frame line");
  times.ready = Number(firstFrame[0]) / 1000;
  try {
    await record.page.evaluate(() => {
      const input = document.getElementById("tamis-data-input");
      input.addEventListener("change", () => (window.tamisPicked = performance.now()), { capture: true, once: true });
    });
    const pickStart = await record.page.evaluate(() => performance.now());
    await harness.pickFile(record, "tamis-data-input", large);
    const [picked, opened] = await record.page.evaluate(() => [window.tamisPicked, performance.now()]);
    times.pick = (picked - pickStart) / 1000;
    times.open = (opened - picked) / 1000;
    // How long the page went without a frame while it loaded, profiled and
    // searched the file: what a click on Cancel may wait for.
    await record.page.evaluate(() => {
      const probe = (window.tamisFrameProbe = { longest: 0, last: performance.now(), stop: false });
      const tick = (now) => {
        probe.longest = Math.max(probe.longest, now - probe.last);
        probe.last = now;
        if (!probe.stop) requestAnimationFrame(tick);
      };
      requestAnimationFrame(tick);
    });
    times.load = await timed(async () => {
      await harness.mustDo(record, "load");
      await harness.idle(record);
    });
    times.gap = await record.page.evaluate(() => {
      window.tamisFrameProbe.stop = true;
      return window.tamisFrameProbe.longest / 1000;
    });
    times.loaded = await record.page.evaluate(() => HEAP8.length / 1e6);
    times.recipe = await timed(() => harness.pickFile(record, "tamis-recipe-input", recipe));
    times.memory = await record.page.evaluate(() => HEAP8.length / 1e6);
    const messages = record.console.withPrefix("TAMIS_MESSAGE");
    if (messages.length) console.log("  page messages: " + messages.join(" | "));
  } finally {
    await record.context.close();
  }
  return times;
}

// One scripted desktop session with the same phases: the first screen, then
// the open, load and open-recipe actions, as tamis-desk --timings reports them.
function deskRound() {
  const work = fs.mkdtempSync(path.join(os.tmpdir(), "tamis-web-bench-"));
  try {
    const script = path.join(work, "actions.txt");
    fs.writeFileSync(script, ["open " + path.resolve(large), "load", "open-recipe " + path.resolve(recipe), ""].join("\n"));
    const run = spawnSync("xvfb-run", ["-a", "-s", "-screen 0 1280x800x24", values.desk, "--scale", "1",
                                       "--timings", "--script", script],
                          { encoding: "utf8", env: { ...process.env, LIBGL_ALWAYS_SOFTWARE: "1" } });
    if (run.status !== 0) throw new Error("tamis-desk failed (" + run.status + "): " + run.stderr);
    const figure = (pattern) => {
      const found = run.stderr.match(pattern);
      if (!found) throw new Error("tamis-desk --timings printed no line matching " + pattern + ":\n" + run.stderr);
      return Number(found[1]);
    };
    const ms = (pattern) => figure(pattern) / 1000;
    return {
      ready: ms(/first screen after ([0-9.]+) ms/),
      pick: NaN,
      open: ms(/line 1 \(open\) done in ([0-9.]+) ms/),
      load: ms(/line 2 \(load\) done in ([0-9.]+) ms/),
      gap: ms(/line 2 \(load\) done in .* longest frame ([0-9.]+) ms/),
      recipe: ms(/line 3 \(open-recipe\) done in ([0-9.]+) ms/),
      // tamis-desk prints MiB (KiB / 1024)
      loaded: figure(/line 2 \(load\) done in .* peak ([0-9.]+) MB/) * 1.048576,
      memory: figure(/line 3 \(open-recipe\) done in .* peak ([0-9.]+) MB/) * 1.048576,
    };
  } finally {
    fs.rmSync(work, { recursive: true, force: true });
  }
}

function median(list) {
  const sorted = list.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

(async () => {
  const megabytes = fs.statSync(large).size / 1e6;
  console.log(`web_bench: ${path.basename(html)}, ${path.basename(large)} (${megabytes.toFixed(1)} MB), ` +
              `recipe ${path.basename(recipe)}, ${rounds} round(s), chromium headless on SwiftShader`);
  // openTamis notes where the loopback server's log stands; from file:// nothing reaches it.
  const server = await harness.startServer(html);
  const browser = await harness.launchChromium();
  const all = [];
  const desk = [];
  const show = (times) => phases.filter((p) => !Number.isNaN(times[p]))
                                .map((p) => `${p} ${times[p].toFixed(isMemory(p) ? 0 : 2)} ${unit(p)}`).join(", ");
  try {
    for (let i = 1; i <= rounds; i++) {
      const times = await round(browser, server);
      all.push(times);
      console.log(`round ${i} page: ` + show(times));
      if (values.desk) {
        desk.push(deskRound());
        console.log(`round ${i} desk: ` + show(desk[desk.length - 1]));
      }
    }
  } finally {
    await browser.close();
    await server.close();
  }
  const medians = (list) => Object.fromEntries(phases.map((p) => [p, median(list.map((t) => t[p]))]));
  const pageMedian = medians(all);
  console.log("median page: " + show(pageMedian));
  const openAndLoad = median(all.map((t) => t.open + t.load));
  console.log(`median page open+load: ${openAndLoad.toFixed(2)} s (${(megabytes / openAndLoad).toFixed(1)} MB/s)`);
  if (values.desk) {
    const deskMedian = medians(desk);
    console.log("median desk: " + show(deskMedian));
    const deskOpenAndLoad = median(desk.map((t) => t.open + t.load));
    console.log("page/desk: " + phases.filter((p) => !Number.isNaN(deskMedian[p]))
                                    .map((p) => `${p} ${(pageMedian[p] / deskMedian[p]).toFixed(2)}x`).join(", ") +
                `, open+load ${(openAndLoad / deskOpenAndLoad).toFixed(2)}x`);
  }
})().catch((error) => {
  console.error(error);
  process.exit(1);
});
