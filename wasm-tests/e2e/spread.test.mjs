// The Spread panel in Chromium from file://: the Monte Carlo runs in two background
// workers (the trials split between them, joined and summarised in a worker), the page
// keeps answering during the run, the progress bar reaches completion, the yield and
// the gain's mean and spread agree with the native CLI (`halfrail spread`) to the
// precision shown, Cancel ends both workers and no result of the cancelled run lands,
// an edit supersedes a run, the histograms are drawn, and the tolerances are fields of
// the design (persisted, undoable, a bad one refused at its field).
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, watch, ready, clearStorage, editElsewhereDuringRun, PAGE_URL, cli, undoButton, instrumentWork, workLog, panelWorkers, panelWorkersStarted, backgroundPanel, supersede } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const bg = backgroundPanel('spread');
const { panel, computed, results, runBox, runShown, settledAs } = bg;
const log = workLog;

// The native CLI's spread summary for a document (built by `make test-e2e`).
const cliSpread = (text) => cli('spread', text);

const figureRow = (page, name) => page.locator('#panel-spread table tbody tr').filter({ hasText: name }).locator('td').allTextContents();
const tolerance = (page, label) => page.locator('#panel-spread').getByLabel(label, { exact: true });

async function openSpread(hash = '#spread') {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.addInitScript(instrumentWork);
  await page.goto(PAGE_URL + hash);
  await ready(page);
  return { page, seen };
}

// How many pixels of each canvas of the panel are in the first series colour (the bars'
// outlines): an axes-only canvas has none.
const barPixels = (page) => page.evaluate(() => {
  const hex = getComputedStyle(document.documentElement).getPropertyValue('--plot-1').trim();
  const want = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
  return [...document.querySelectorAll('#panel-spread canvas')].filter((c) => c.getBoundingClientRect().width > 0).map((c) => {
    const { data } = c.getContext('2d').getImageData(0, 0, c.width, c.height);
    let n = 0;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i + 3] > 200 && Math.abs(data[i] - want[0]) + Math.abs(data[i + 1] - want[1]) + Math.abs(data[i + 2] - want[2]) < 30) n++;
    }
    return n;
  });
});

test('the demo spreads in two workers; the yield and the gain agree with the CLI; the histograms are drawn', async () => {
  const { page, seen } = await openSpread();
  await results(page, 1);
  const l = await log(page);
  assert.equal(panelWorkers(l).length, 2, `two workers made: ${panelWorkers(l)}`);
  assert.deepEqual(panelWorkers(l).map((w) => w.split(' ')[0]).sort(), ['halfrail-spread-0', 'halfrail-spread-1']);
  assert.ok(panelWorkers(l).every((w) => / blob:/.test(w)), 'from a Blob');
  assert.equal(await panelWorkersStarted(page), 2);

  const text = await page.evaluate(() => HR.design.text());
  const cli = cliSpread(text);
  assert.equal(cli.trials, 2000);
  // To the precision shown (wasm and native libm differ in the last bits).
  assert.equal(await page.locator('#panel-spread [data-key="yield"]').textContent(), `Yield ${(100 * cli.yield).toFixed(1)} %`);
  assert.match(await panel(page).textContent(), new RegExp(`${Math.round(cli.yield * cli.trials)} of 2000 trials meet the target’s limits: gain at f_design 11\\.00 dB … 13\\.00 dB, low band edge ≤ 100\\.0 kHz\\.`));
  const [nominal, mean, std, range] = await figureRow(page, 'Gain at f_design');
  assert.equal(mean, `${cli.gain_db.mean.toFixed(2)} dB`);
  assert.equal(std, `${cli.gain_db.std.toFixed(2)} dB`);
  assert.equal(nominal, `${cli.nominal.gain_db.toFixed(2)} dB`);
  assert.equal(range, `${cli.gain_db.p1.toFixed(2)} dB … ${cli.gain_db.p99.toFixed(2)} dB`);
  // The demo's stage meets its own 12 dB target: no limit is missed by the nominal
  // design, and most trials pass (the CLI's yield, above).
  assert.doesNotMatch(await panel(page).textContent(), /nominal design itself misses/);
  assert.ok(cli.yield > 0.8, `the demo's yield ${cli.yield}`);
  // The worst corner is at least as far out as any trial.
  const corner = cli.corners.find((c) => c.figure === 'gain_db');
  assert.ok(corner.low <= cli.gain_db.min && corner.high >= cli.gain_db.max);
  assert.equal((await figureRow(page, 'Gain at f_design'))[4], `${corner.low.toFixed(2)} dB … ${corner.high.toFixed(2)} dB`);

  // Which part to buy tighter: the bars for the gain, largest first, as the CLI's swings.
  const swings = cli.swings.filter((s) => s.swing.gain_db !== null).sort((a, b) => Math.abs(b.swing.gain_db) - Math.abs(a.swing.gain_db));
  const bars = await page.locator('#panel-spread .bar-row').evaluateAll((rs) => rs.map((r) => r.dataset.key));
  assert.deepEqual(bars, swings.map((s) => s.quantity));
  const top = swings[0];
  assert.equal(await page.locator(`#panel-spread .bar-row[data-key="${top.quantity}"] .bar-value`).textContent(), `+${top.swing.gain_db.toFixed(2)} dB`);
  await page.getByLabel('Figure', { exact: true }).selectOption('iq_a');
  const iq = cli.swings.filter((s) => s.swing.iq_a !== null).sort((a, b) => Math.abs(b.swing.iq_a) - Math.abs(a.swing.iq_a));
  assert.equal(await page.locator('#panel-spread .bar-row').first().getAttribute('data-key'), iq[0].quantity);

  // Six histograms drawn (the demo's loop crosses below f_design, SPEC §3.3: every
  // trial has a phase margin), each with a caption; no trial oscillates.
  assert.ok(cli.phase_margin_deg !== null && cli.phase_margin_deg.count > 0);
  assert.equal(cli.oscillating, 0);
  assert.equal(await page.locator('#panel-spread .plot-cell .plot-note').count(), 6);
  const drawn = await barPixels(page);
  assert.equal(drawn.length, 6, 'six histogram canvases');
  assert.ok(drawn.every((n) => n > 100), `bar pixels per canvas: ${drawn}`);
  assert.match(await page.locator('#panel-spread .plot-cell[data-key="gain_db"] .plot-note').textContent(),
    new RegExp(`^2000 trials: mean ${cli.gain_db.mean.toFixed(2)} dB, std dev ${cli.gain_db.std.toFixed(2)} dB`));
  assert.doesNotMatch(await panel(page).textContent(), /NaN|undefined|Infinity/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the demo meets its own target: Stage shows a gain within the target’s limits, and Spread a yield above 80 %', async () => {
  const { page, seen } = await openSpread('#stage');
  await page.waitForSelector('#panel-stage[data-computed]');
  // The target as the Stage panel's form shows it, and the gain the stage gives.
  const stage = page.locator('#panel-stage');
  const target = Number(await stage.getByLabel(await page.evaluate(() => HR.field('target', 'gain_db').label), { exact: true }).inputValue());
  const tol = Number(await stage.getByLabel(await page.evaluate(() => HR.field('target', 'gain_tol_db').label), { exact: true }).inputValue());
  assert.deepEqual([target, tol], [12, 1]);
  const gain = parseFloat(await stage.locator('dd[data-key="gain"]').textContent());
  assert.ok(Math.abs(gain - target) < 0.5 * tol, `the stage gives ${gain} dB against ${target} ± ${tol} dB`);
  // The Spread panel: the yield over the demo's tolerances.
  await page.locator('#rail a[href="#spread"]').click();
  await results(page, 1);
  const shown = await page.locator('#panel-spread [data-key="yield"]').textContent();
  const m = /^Yield (\d+\.\d) %$/.exec(shown);
  assert.ok(m && Number(m[1]) > 80, shown);
  assert.doesNotMatch(await panel(page).textContent(), /nominal design itself misses/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the page keeps answering during a run, and the progress bar rises to completion', async () => {
  const { page, seen } = await openSpread('#bench');
  await page.locator('#rail a[href="#spread"]').click();
  await results(page, 1);
  // A longer run, so there is time to watch it.
  await tolerance(page, 'Trials').fill('12000');
  await results(page, 2);
  const during = await editElsewhereDuringRun(page, 'spread');
  // -45 dBm across 50 Ω: 3.557 mVpp (as page.test.mjs).
  assert.equal(during.vpp, '3.557 mVpp');
  assert.ok(during.stillRunning, 'the edit elsewhere was answered while the run still ran');
  await results(page, 3);
  const t1 = await page.evaluate(() => performance.now());
  const l = await log(page);
  const frames = l.frames.filter((t) => t >= during.t0 && t <= t1);
  const gaps = frames.slice(1).map((t, i) => t - frames[i]);
  assert.ok(frames.length >= 5, `${frames.length} frames during the run`);
  // Under 400 ms: a 12 000-trial run takes seconds if it ran on the main thread; the
  // allowance is for drawing the result on a loaded two-core machine (200 ms was seen there).
  assert.ok(Math.max(...gaps) < 400, `longest gap between frames during the run: ${Math.max(...gaps).toFixed(0)} ms`);
  const values = l.progress.filter(([t]) => t >= during.t0).map(([, v]) => v);
  assert.ok(values.length >= 5, `progress values: ${values}`);
  assert.equal(values[0], 0);
  assert.ok(values.every((v, i) => i === 0 || v >= values[i - 1]), `progress never goes back: ${values}`);
  assert.equal(values[values.length - 1], 1, 'the bar reached completion');
  assert.equal(await runBox(page).isVisible(), false);
  assert.match(await page.locator('#panel-spread .run-note').textContent(), /^12000 trials computed in \d+\.\d\d s in two background workers\.$/);
  assert.equal(panelWorkers(l).length, 2, 'the two workers are kept between runs');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('Cancel ends both workers and no result of the run lands; an edit supersedes a run', async () => {
  const { page, seen } = await openSpread();
  await results(page, 1);
  const mean = (await figureRow(page, 'Gain at f_design'))[1];
  const trials = tolerance(page, 'Trials');
  await trials.fill('30000');
  const terminated = await bg.cancelDuringRun(page);
  assert.equal(await runBox(page).isVisible(), false);
  assert.equal((await log(page)).terminated, terminated + 2, 'both workers were terminated');
  assert.equal(await page.locator('#panel-spread .stale-note').getAttribute('data-why'), 'cancelled');
  // Held, its workers ended: nothing of the cancelled run can land.
  await settledAs(page, 'held');
  assert.equal(await computed(page), 1);
  assert.equal((await figureRow(page, 'Gain at f_design'))[1], mean);
  assert.equal(await runBox(page).isVisible(), false, 'a cancelled run is not restarted by itself');

  // An edit during a run supersedes it: one result, for the last value.
  await trials.fill('3000');
  await results(page, 2);
  assert.equal(panelWorkers(await log(page)).length, 4, 'two fresh workers after the cancel');
  const notes = await supersede(page, bg, trials, ['20000', '4000'], 3, '#panel-spread .run-note');
  assert.equal(await computed(page), 3, 'one result for the two edits');
  assert.deepEqual(notes.map((t) => t.split(' ')[0]), ['4000']);
  assert.equal(await page.locator('#panel-spread .stale-note').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the tolerances are part of the design: a bad one is refused at its field without a run, and undo restores it', async () => {
  const { page, seen } = await openSpread();
  await results(page, 1);
  const resistors = tolerance(page, 'Resistors');
  assert.equal(await resistors.inputValue(), '1');
  await resistors.fill('75');
  await page.waitForFunction(() => !document.querySelector('#panel-spread p.error').hidden);
  assert.equal(await resistors.getAttribute('aria-invalid'), 'true');
  assert.match(await page.locator('#panel-spread p.error').textContent(), /^Resistors: /);
  assert.equal(await page.locator('#panel-spread .stale-note').isVisible(), true);
  await settledAs(page, 'settled');
  assert.equal(await runBox(page).isVisible(), false, 'no run for a draft the core refuses');
  assert.equal(await computed(page), 1);

  await resistors.fill('5');
  await results(page, 2);
  assert.equal(await resistors.getAttribute('aria-invalid'), 'false');
  const wider = (await figureRow(page, 'Gain at f_design'))[2];
  await undoButton(page).click();
  await results(page, 3);
  assert.equal(await resistors.inputValue(), '1');
  assert.notEqual((await figureRow(page, 'Gain at f_design'))[2], wider, 'the spread follows the tolerance');
  await page.reload();
  await ready(page);
  await results(page, 1);
  assert.equal(await tolerance(page, 'Resistors').inputValue(), '1');
  assert.equal(await tolerance(page, 'Seed').inputValue(), '7');
  assert.deepEqual(seen.errors, []);
  await page.close();
});
