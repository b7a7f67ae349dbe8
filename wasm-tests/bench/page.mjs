// `make bench`, page figures: size of dist/halfrail.html (bytes and gzip), and in
// headless Chromium from file:// the time from navigation to the first computed
// result (the demo's Part panel: bias and both transfer curves) and the wasm start-up
// time (median of 5 fresh loads each).
// Targets: one file ≤ 1 MB, first result ≤ 300 ms (the gzip budget is withdrawn: gzip
// is reported only); (issue 3)
// a 500-point transfer curve ≤ 5 ms in wasm; (issue 8) the spread of 2000 trials ≤ 1500 ms
// in one worker; (issue 17) one tone ≤ 5 ms, the whole Swing analysis ≤ 30 ms, the
// spread in two workers ≤ 50 ms, the loop analysis ≤ 1.5× native, the heap after a
// tour ≤ 64 MB; (issue 15) a Stage edit in the DOM no slower than 5.3 ms p95. Core
// timings run inside the page.
import fs from 'fs';
import zlib from 'zlib';
import { launch, PAGE_PATH, PAGE_URL } from '../e2e/browser.mjs';

const RUNS = 5;
const NATIVE_FIGURES = 'target/bench/native.json';
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const html = fs.readFileSync(PAGE_PATH);
const gzip = zlib.gzipSync(html, { level: 9 }).length;

const browser = await launch();
const first = [];
const wasm = [];
let core = null;
for (let i = 0; i < RUNS; i++) {
  const page = await browser.context.newPage();
  // The page as a new user first sees it: no stored design, so the demo on the Part panel.
  await page.goto(PAGE_URL);
  await page.evaluate(() => localStorage.clear());
  await page.goto(PAGE_URL + '#part');
  await page.reload();
  await page.waitForSelector('html[data-ready="true"]');
  await page.waitForSelector('#panel-part[data-computed]');
  // The first figures drawn (the Part panel computes in a worker, after the shell is up).
  const t = await page.evaluate(() => ({
    first: (performance.getEntriesByName('hr-first-figures')[0] || performance.getEntriesByName('hr-first-result')[0]).startTime,
    wasm: performance.getEntriesByName('hr-wasm-instantiate')[0].duration,
  }));
  first.push(t.first);
  wasm.push(t.wasm);
  if (i === 0) {
    // Core timings in wasm, inside the page: median of 21 batches of 5 calls each,
    // after 10 calls that let V8 move the hot functions from its baseline compiler
    // to the optimising one (the native figures are warm too).
    core = await page.evaluate(() => {
      // Long runs (`batches` given) take fewer, unbatched samples after two warm-up calls.
      const median = (f, batches) => {
        const [warm, runs, batch] = batches ? [2, batches * 2 + 1, 1] : [10, 21, 5];
        for (let k = 0; k < warm; k++) f();
        const ts = [];
        for (let k = 0; k < runs; k++) {
          const t0 = performance.now();
          for (let j = 0; j < batch; j++) f();
          ts.push((performance.now() - t0) / batch);
        }
        return ts.sort((a, b) => a - b)[Math.floor(runs / 2)];
      };
      const demo = wasm_bindgen.demoDocument();
      const doc = JSON.parse(demo);
      doc.part = wasm_bindgen.presets().find((p) => p.id === 'buffered-5v').part;
      const buffered = JSON.stringify(doc);
      const wide = JSON.parse(demo);
      Object.assign(wide.analysis, { f_start_hz: 1e4, f_stop_hz: 1e9, points_per_decade: 200 });
      const sweep = JSON.stringify(wide);
      return {
        response: median(() => wasm_bindgen.responseReport(sweep)),
        responseCore: median(() => wasm_bindgen.benchCore(sweep, 'response')),
        stabilityCore: median(() => wasm_bindgen.benchCore(sweep, 'stability')),
        loopPanel: median(() => wasm_bindgen.loopReport(sweep)),
        design: median(() => wasm_bindgen.benchCore(demo, 'design'), 5),
        oneTone: median(() => wasm_bindgen.benchCore(demo, 'one-tone'), 5),
        twoTone: median(() => wasm_bindgen.benchCore(demo, 'two-tone'), 3),
        compression: median(() => wasm_bindgen.benchCore(demo, 'compression'), 3),
        swing: median(() => wasm_bindgen.swingReport(demo, () => {}), 3),
        chain12: (() => {
          // The demo chain grown to 12 blocks, the stage block's figures computed once.
          const long = JSON.parse(demo);
          const blocks = long.chain.blocks;
          while (blocks.length < 12) blocks.push({ kind: 'amp', name: `amp ${blocks.length}`, gain_db: 12, nf_db: 5, oip3_dbm: 25, op1db_dbm: 12 });
          const text = JSON.stringify(long);
          const stage = JSON.stringify(wasm_bindgen.stageBlock(text));
          return median(() => wasm_bindgen.chainReport(text, stage));
        })(),
        chain12run: (() => {
          // The same with three stages in a row solved as one circuit on every recompute.
          const long = JSON.parse(demo);
          const blocks = long.chain.blocks;
          blocks.splice(1, 0, { kind: 'stage', name: 'second' }, { kind: 'stage', name: 'third' });
          while (blocks.length < 12) blocks.push({ kind: 'amp', name: `amp ${blocks.length}`, gain_db: 12, nf_db: 5, oip3_dbm: 25, op1db_dbm: 12 });
          long.chain.stage_runs = 'one-circuit';
          const text = JSON.stringify(long);
          const stage = JSON.stringify(wasm_bindgen.stageBlock(text));
          return median(() => wasm_bindgen.chainReport(text, stage));
        })(),
        // What the Stage panel computes on the main thread at its costliest: the demo
        // with one or nine inverters and the densest sweep the core still calls quick.
        quickest: [1, 9].map((stages) => {
          const costliest = JSON.parse(demo);
          costliest.part.stages = stages;
          for (let ppd = 1000; ppd >= 1; ppd--) {
            costliest.analysis.points_per_decade = ppd;
            if (wasm_bindgen.checkDocument(JSON.stringify(costliest)).quick) break;
          }
          const text = JSON.stringify(costliest);
          return median(() => { wasm_bindgen.responseReport(text); wasm_bindgen.biasOf(text); }, 5);
        }),
        spread: median(() => wasm_bindgen.spreadReport(demo, () => {}), 1),
        curve1: median(() => wasm_bindgen.transferCurve(demo, 500)),
        curve3: median(() => wasm_bindgen.transferCurve(buffered, 500)),
        report: median(() => wasm_bindgen.partReport(demo, 501)),
        fit: median(() => wasm_bindgen.benchFit(demo)),
        // The demo's oscillator (the lab receiver's reference): the Crystal panel's
        // report (small signal and steady state), and the panel's run, the report and
        // its curves. The bindings keep the last text's oscillator, so each call here
        // is of a text other than the last (a trailing space), as after an edit.
        ...(() => {
          let k = 0;
          const next = () => `${demo}${' '.repeat(++k % 2)}`;
          return {
            crystal: median(() => wasm_bindgen.crystalReport(next()), 5),
            crystalPanel: median(() => { const t = next(); wasm_bindgen.crystalReport(t); wasm_bindgen.crystalCurves(t); }, 3),
            crystalDesign: median(() => wasm_bindgen.crystalDesign(next()), 2),
          };
        })(),
      };
    });
  }
  await page.close();
}

// The Spread panel's run through the page's own worker facility (HR.spread.run, on
// HR.background): the demo's 2000 trials in one worker (spreadReport), and split between
// two (spreadTrials on two lanes, the second with spreadBounds, then spreadStatistics), from the call to the report in
// hand; the workers are kept between runs, so two warm-up runs first, then the median of 5.
const workerPage = await browser.context.newPage();
await workerPage.goto(PAGE_URL + '#bench');
await workerPage.waitForSelector('html[data-ready="true"]');
const spreadWorkers = await workerPage.evaluate(async () => {
  const demo = wasm_bindgen.demoDocument();
  const out = {};
  for (const lanes of [1, 2]) {
    const ts = [];
    for (let k = 0; k < 7; k++) {
      const t0 = performance.now();
      const r = await HR.spread.run(demo, () => {}, lanes).promise;
      if (!r.ok) throw new Error(`spread in ${lanes} workers: ${JSON.stringify(r)}`);
      if (k >= 2) ts.push(performance.now() - t0);
    }
    out[lanes] = ts.sort((a, b) => a - b)[2];
  }
  return out;
});
await workerPage.close();

// An edit until the shown panel's figures are redrawn: 40 edits of R fb, on the
// Stage panel (its figures and schematic) and on the Swing panel (issue 17: the
// whole large-signal analysis). Two times each: to the frame that first finds the
// figures counted (polled every frame, so a result that comes from a worker is seen
// at the next frame), and to the moment they are counted, drawn in the DOM (`exact`);
// and which frame after the edit first shows them (`frames`: 1, the next, is the best
// there is; its time in ms is mostly where in a frame the edit fell).
const editTimes = async (panelId) => {
  const editPage = await browser.context.newPage();
  await editPage.goto(PAGE_URL + '#' + panelId);
  await editPage.waitForSelector(`#panel-${panelId}[data-computed]`);
  const times = await editPage.evaluate(async (panelId) => {
    const panel = document.getElementById(`panel-${panelId}`);
    const out = { edits: [], exact: [], frames: [] };
    for (let i = 0; i < 40; i++) {
      const n = Number(panel.dataset.computed);
      let counted = null;
      const seen = new MutationObserver(() => { if (counted === null && Number(panel.dataset.computed) > n) counted = performance.now(); });
      seen.observe(panel, { attributes: true, attributeFilter: ['data-computed'] });
      const t0 = performance.now();
      HR.design.set('stage', 'r_fb_ohm', i % 2 ? '2k2' : '2k4', 'bench');
      // The panel recomputes in a microtask after the edit; wait for that, then for frames if need be.
      await Promise.resolve();
      let frames = 0;
      await new Promise((resolve) => {
        const poll = () => (Number(panel.dataset.computed) > n ? resolve() : requestAnimationFrame(() => { frames += 1; poll(); }));
        poll();
      });
      out.edits.push(performance.now() - t0);
      // The frame that first shows the figures: 1 when they are in before the next one
      // (the frame's time after the edit is where in its 16.7 ms the edit fell).
      out.frames.push(Math.max(1, frames));
      seen.takeRecords();
      seen.disconnect();
      out.exact.push((counted === null ? performance.now() : counted) - t0);
    }
    return out;
  }, panelId);
  await editPage.close();
  return times;
};
const { edits, exact, frames } = await editTimes('stage');
const swingEdits = await editTimes('swing');

// The heap after a tour of every panel (issue 17: ≤ 64 MB): each panel of the rail
// shown in turn until its figures are in, then, after a garbage collection, the JS
// heap of the page and of each of its workers (CDP Runtime.getHeapUsage, the workers
// reached through the Target domain) plus the wasm linear memory of each instance.
const tourPage = await browser.context.newPage();
await tourPage.goto(PAGE_URL + '#part');
await tourPage.waitForSelector('html[data-ready="true"]');
for (const id of await tourPage.locator('#rail a').evaluateAll((as) => as.map((a) => a.dataset.panel))) {
  await tourPage.locator(`#rail a[data-panel="${id}"]`).click();
  await tourPage.waitForSelector(`#panel-${id}:not([hidden])`);
  // A panel that follows the design has its figures in when its follower has settled.
  await tourPage.waitForFunction((id) => {
    const p = document.getElementById(`panel-${id}`);
    return !p.dataset.follow || p.dataset.follow === 'settled';
  }, id, { timeout: 120000 });
}
const cdp = await browser.context.newCDPSession(tourPage);
await cdp.send('HeapProfiler.collectGarbage');
const heap = { js: (await cdp.send('Runtime.getHeapUsage')).usedSize, wasm: await tourPage.evaluate(() => wasm_bindgen.initSync().memory.buffer.byteLength), workers: 0 };
const replies = new Map();
cdp.on('Target.receivedMessageFromTarget', ({ sessionId, message }) => {
  const m = JSON.parse(message);
  if (replies.has(sessionId) && m.id === 1) replies.get(sessionId)(m.result);
});
for (const t of (await cdp.send('Target.getTargets')).targetInfos.filter((t) => t.type === 'worker')) {
  const { sessionId } = await cdp.send('Target.attachToTarget', { targetId: t.targetId, flatten: false });
  const reply = new Promise((resolve) => replies.set(sessionId, resolve));
  await cdp.send('Target.sendMessageToTarget', { sessionId, message: JSON.stringify({ id: 1, method: 'Runtime.getHeapUsage' }) });
  heap.js += (await reply).usedSize;
  heap.workers += 1;
}
for (const w of tourPage.workers()) heap.wasm += await w.evaluate(() => wasm_bindgen.initSync().memory.buffer.byteLength);
await tourPage.close();
await browser.close();
const heapMb = (heap.js + heap.wasm) / 2 ** 20;
const pct95 = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(0.95 * xs.length)];
const p95 = pct95(edits);
const framesP95 = pct95(frames);
const p95exact = pct95(exact);
const swingP95 = pct95(swingEdits.edits);
const swingP95exact = pct95(swingEdits.exact);

// The native figures `cargo bench --bench core` left behind, for the targets set
// against them: wasm ≤ `limit`× native (issue 17: the loop analysis ≤ 1.5×).
const native = fs.existsSync(NATIVE_FIGURES) ? JSON.parse(fs.readFileSync(NATIVE_FIGURES, 'utf8')) : {};
const ratio = (name, ms, limit = 2) => {
  if (!(name in native)) return [`≤ ${limit}× native (no native figure)`, false];
  const times = ms / (native[name] * 1e3);
  return [`≤ ${limit}× native (${times.toFixed(2)}×)`, times <= limit];
};

const rows = [
  ['page size', `${html.length} B`, '≤ 1000000 B', html.length <= 1_000_000],
  ['page size, gzip', `${gzip} B`, '', null],
  ['first computed result (median of 5)', `${median(first).toFixed(1)} ms`, '≤ 300 ms', median(first) <= 300],
  ['wasm inflate + compile + instantiate (median of 5)', `${median(wasm).toFixed(1)} ms`, '', true],
  ['wasm: transfer curve, 500 points, demo part', `${core.curve1.toFixed(2)} ms`, '≤ 5 ms', core.curve1 <= 5],
  ['wasm: transfer curve, 500 points, three-stage part', `${core.curve3.toFixed(2)} ms`, '≤ 5 ms', core.curve3 <= 5],
  ['wasm: Part panel update (bias, both curves)', `${core.report.toFixed(2)} ms`, '', true],
  ['wasm: bench fit of the demo readings', `${core.fit.toFixed(1)} ms`, '', true],
  ['wasm: response of the demo, 1001 points (core)', `${core.responseCore.toFixed(2)} ms`, ...ratio('response', core.responseCore)],
  ['wasm: the same with the report handed to the page', `${core.response.toFixed(1)} ms`, '', true],
  ['wasm: loop analysis of the demo, 1001 points (core)', `${core.stabilityCore.toFixed(2)} ms`, ...ratio('stability', core.stabilityCore, 1.5)],
  ['wasm: Loop panel report (loop, helper, handed over)', `${core.loopPanel.toFixed(1)} ms`, '', true],
  ['wasm: design to target, demo (12 dB, E24, 100 kHz)', `${core.design.toFixed(1)} ms`, '≤ 50 ms', core.design <= 50],
  ...core.quickest.map((ms, i) => [`wasm: Stage figures, costliest quick document, ${[1, 9][i]} inverter(s)`, `${ms.toFixed(1)} ms`, '≤ 8 ms (main thread)', ms <= 8]),
  ['wasm: one tone at the document\'s level, settled (demo)', `${core.oneTone.toFixed(2)} ms`, '≤ 5 ms', core.oneTone <= 5],
  ['wasm: two-tone record, 2^13 samples (demo)', `${core.twoTone.toFixed(1)} ms`, '≤ 150 ms', core.twoTone <= 150],
  ['wasm: compression sweep, 20 levels, settled (demo)', `${core.compression.toFixed(1)} ms`, '≤ 1000 ms', core.compression <= 1000],
  ['wasm: whole Swing panel analysis (demo)', `${core.swing.toFixed(1)} ms`, '≤ 30 ms', core.swing <= 30],
  ['wasm: spread, 2000 trials, one thread (demo)', `${core.spread.toFixed(0)} ms`, '≤ 1500 ms', core.spread <= 1500],
  ['wasm: crystal analysis, demo oscillator (crystalReport)', `${core.crystal.toFixed(1)} ms`, '≤ 20 ms', core.crystal <= 20],
  ['wasm: the Crystal panel\'s run, report and curves of the demo', `${core.crystalPanel.toFixed(1)} ms`, '', true],
  ['wasm: crystal design helper, demo oscillator (crystalDesign)', `${core.crystalDesign.toFixed(1)} ms`, '≤ 100 ms', core.crystalDesign <= 100],
  ['wasm: chain, 12 blocks (stage figures known)', `${core.chain12.toFixed(2)} ms`, '≤ 1 ms', core.chain12 <= 1],
  ['wasm: chain, 12 blocks, 3-stage run as one circuit', `${core.chain12run.toFixed(2)} ms`, '≤ 1 ms', core.chain12run <= 1],
  ['page: spread, 2000 trials, one worker (demo)', `${spreadWorkers[1].toFixed(0)} ms`, '≤ 1500 ms', spreadWorkers[1] <= 1500],
  ['page: spread, 2000 trials, two workers (demo)', `${spreadWorkers[2].toFixed(0)} ms`, `≤ 50 ms (${(spreadWorkers[1] / spreadWorkers[2]).toFixed(2)}× one worker)`, spreadWorkers[2] <= 50],
  [`heap after a tour of the panels (page + ${heap.workers} workers)`, `${heapMb.toFixed(1)} MB`, '≤ 64 MB', heapMb <= 64],
  ['  of which JS heaps / wasm memories', `${(heap.js / 2 ** 20).toFixed(1)} / ${(heap.wasm / 2 ** 20).toFixed(1)} MB`, '', null],
  ['Stage edit to redrawn figures, 95th percentile of 40', `${p95.toFixed(1)} ms`, '', null],
  ['Stage edit: the frame that first shows the figures, p95', `frame ${framesP95}`, 'the next one', framesP95 <= 1],
  ['Stage edit to figures in the DOM, 95th percentile', `${p95exact.toFixed(1)} ms`, '≤ 5.3 ms (issue 15)', p95exact <= 5.3],
  ['Swing shown: edit to redrawn figures, p95 of 40', `${swingP95.toFixed(1)} ms`, '', null],
  ['Swing shown: edit to figures in the DOM, p95', `${swingP95exact.toFixed(1)} ms`, '', null],
];
for (const [what, figure, target, met] of rows) {
  console.log(`${what.padEnd(52)} ${figure.padStart(12)}  ${target.padEnd(30)} ${target ? (met ? 'met' : 'MISSED') : ''}`);
}
console.log(`all runs, first result (ms): ${first.map((x) => x.toFixed(1)).join(' ')}`);
