// Times the single-file page tamis.html in Debian's headless Chromium (not a
// test; CTest never runs it). Per round, in a fresh browser context:
//   ready    page load until the first frame (the TAMIS_READY console line)
//   open     picking the large file in the data input until the page is idle
//            (the file read in slices into the WebAssembly heap, open screen)
//   load     the `load` action until idle (loading and profiling)
//   recipe   picking the recipe in the recipe input until idle (replay)
// It prints every round and the median of each phase. The machine is shared
// and its speed varies: compare with `tamis-desk --timings` on the same file
// in the same run, not with figures from another day.
//
// usage: node tests/bench/web_bench.js TAMIS_HTML LARGE.csv [RECIPE.json] [--rounds N]
//   RECIPE defaults to the demo recipe (assets/demo/tree_survey.recipe.json);
//   a large file with the demo's columns: assets/demo/generate.py --rows N --out-dir DIR
// Needs playwright-core from tests/web (./dev.sh install, or npm ci in tests/web).
"use strict";
const fs = require("fs");
const path = require("path");
const { parseArgs } = require("util");
const harness = require("../web/page_harness");

const { values, positionals } = parseArgs({
  allowPositionals: true,
  options: { rounds: { type: "string", default: "3" } },
});
const [html, large, recipe = path.join(__dirname, "..", "..", "assets", "demo", "tree_survey.recipe.json")] = positionals;
const rounds = Number(values.rounds);
if (!html || !large || !(rounds >= 1)) {
  console.error("usage: node tests/bench/web_bench.js TAMIS_HTML LARGE.csv [RECIPE.json] [--rounds N]");
  process.exit(2);
}
for (const file of [html, large, recipe]) {
  if (!fs.existsSync(file)) {
    console.error("missing: " + file);
    process.exit(2);
  }
}

const phases = ["ready", "open", "load", "recipe"];

async function timed(work) {
  const start = process.hrtime.bigint();
  await work();
  return Number(process.hrtime.bigint() - start) / 1e9;
}

async function round(browser, server) {
  const times = {};
  let record;
  times.ready = await timed(async () => { record = await harness.openTamis(browser, "file", html, server); });
  try {
    times.open = await timed(() => harness.pickFile(record, "tamis-data-input", large));
    times.load = await timed(async () => {
      await harness.mustDo(record, "load");
      await harness.idle(record);
    });
    times.recipe = await timed(() => harness.pickFile(record, "tamis-recipe-input", recipe));
    const messages = record.console.withPrefix("TAMIS_MESSAGE");
    if (messages.length) console.log("  page messages: " + messages.join(" | "));
  } finally {
    await record.context.close();
  }
  return times;
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
  try {
    for (let i = 1; i <= rounds; i++) {
      const times = await round(browser, server);
      all.push(times);
      console.log(`round ${i}: ` + phases.map((p) => `${p} ${times[p].toFixed(2)} s`).join(", "));
    }
  } finally {
    await browser.close();
    await server.close();
  }
  console.log("median: " + phases.map((p) => `${p} ${median(all.map((t) => t[p])).toFixed(2)} s`).join(", "));
  const openAndLoad = median(all.map((t) => t.open + t.load));
  console.log(`median open+load: ${openAndLoad.toFixed(2)} s (${(megabytes / openAndLoad).toFixed(1)} MB/s)`);
})().catch((error) => {
  console.error(error);
  process.exit(1);
});
