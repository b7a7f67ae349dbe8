// No freeze: the panels that follow the design (Part, Stage, Response, Loop) call the
// core in workers, so a call that runs away cannot block the page. A test-only hook
// makes the Stage panel's worker spin whenever the design holds R fb = 6k8; while it
// spins the page draws frames, answers clicks and keys on another panel, says on the
// panel that it is computing, and Cancel stops the run. A real legal document whose
// loop analysis takes far longer than a frame computes in the background likewise. A
// run superseded in its lane ends as it was asked to (its worker ended, or kept), and a
// kept lane ends a runaway that a newer run has waited behind for a grace.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, ready, watch, instrumentWork, workLog, framesDrawn, undoButton, holdWorkers, PAGE_URL } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

// Init script: any message that carries a design with R fb = 6k8 is held for a
// minute before it is answered — a core call that never comes back in time.
const runawayHook = holdWorkers((data) => JSON.stringify(data).includes('\\"r_fb_ohm\\":\\"6k8\\"'), 60000);

const stage = (page) => page.locator('#panel-stage');
const follow = (page) => stage(page).getAttribute('data-follow');
const computed = (page) => stage(page).getAttribute('data-computed').then(Number);

// The Stage panel with its first figures, its workers logged and the runaway hook in.
const stagePage = async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.addInitScript(instrumentWork);
  await page.addInitScript(runawayHook);
  await page.goto(`${PAGE_URL}#stage`);
  await ready(page);
  await page.waitForSelector('#panel-stage[data-computed][data-follow="settled"]', { state: 'attached' });
  return { page, seen };
};

test('a runaway core call leaves the page responsive, says it is computing, and Cancel stops it', async () => {
  const { page, seen } = await stagePage();
  const n = await computed(page);
  // Mount the Bench panel once, to type into it during the run.
  await page.locator('#rail a[href="#bench"]').click();
  await page.locator('#panel-bench').waitFor();
  await page.locator('#rail a[href="#stage"]').click();
  await page.waitForSelector('#panel-stage:not([hidden])');

  // The user types R fb = 6k8: the run it starts never ends by itself.
  await stage(page).locator('button.value[data-key="r_fb_ohm"]').click();
  await stage(page).locator('input.in-place').fill('6k8');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#panel-stage[data-follow="running"]', { state: 'attached' });
  // Once the run outlasts the quiet time the panel says so, with Cancel.
  const box = stage(page).locator('.run');
  await box.waitFor({ state: 'visible' });
  assert.match(await box.textContent(), /Computing the key figures in the background/);
  assert.match(await stage(page).locator('.stale-note').textContent(), /^Computing for the design as it is now/);
  assert.equal(await stage(page).locator('.readout').getAttribute('class'), 'readout stale', 'the old figures are marked stale');
  // The schematic shows what was typed at once.
  assert.match(await stage(page).locator('button.value[data-key="r_fb_ohm"]').textContent(), /6k8/);

  // Meanwhile the page draws frames…
  const frames = (await workLog(page)).frames.length;
  await framesDrawn(page, 3);
  assert.ok((await workLog(page)).frames.length >= frames + 3);
  // …answers a click on the rail and keys typed on the Bench panel…
  await page.locator('#rail a[href="#bench"]').click();
  const level = page.locator('#panel-bench').getByLabel('Level', { exact: true });
  const vpp = page.locator('#panel-bench dd[data-key="vpp"]');
  const was = await vpp.textContent();
  await level.fill(was.includes('1.26') ? '-40 dBm' : '-45 dBm');
  await page.waitForFunction((w) => document.querySelector('#panel-bench dd[data-key="vpp"]').textContent !== w, was);
  // …and back on Stage, the run is still going.
  await page.locator('#rail a[href="#stage"]').click();
  await page.waitForSelector('#panel-stage:not([hidden])');
  assert.equal(await follow(page), 'running');
  assert.equal(await computed(page), n, 'no result yet');

  // Cancel stops it: the worker is ended, the last figures stay, marked as for an
  // earlier design, and Compute now is offered.
  const ended = (await workLog(page)).terminated;
  await box.getByRole('button', { name: 'Cancel' }).click();
  await page.waitForSelector('#panel-stage[data-follow="held"]', { state: 'attached' });
  assert.equal(await box.isVisible(), false);
  assert.ok((await workLog(page)).terminated > ended, 'the spinning worker was terminated');
  assert.equal(await stage(page).locator('.stale-note').getAttribute('data-why'), 'cancelled');
  assert.equal(await stage(page).getByRole('button', { name: 'Compute now' }).isVisible(), true);
  assert.equal(await computed(page), n);

  // Undo takes R fb back to 2k2, the design the figures on show are for: no longer stale.
  await undoButton(page).click();
  await page.waitForSelector('#panel-stage[data-follow="settled"]', { state: 'attached' });
  assert.equal(await stage(page).locator('.stale-note').isVisible(), false);
  assert.equal(await stage(page).locator('.readout').getAttribute('class'), 'readout');
  // The next edit computes in a fresh worker.
  await stage(page).locator('button.value[data-key="r_fb_ohm"]').click();
  await stage(page).locator('input.in-place').fill('4k7');
  await page.keyboard.press('Enter');
  await page.waitForSelector(`#panel-stage[data-computed="${n + 1}"][data-follow="settled"]`, { state: 'attached' });
  assert.equal(await stage(page).locator('.stale-note').isVisible(), false);
  assert.equal(await stage(page).getByRole('button', { name: 'Compute now' }).isVisible(), false);
  assert.equal(await stage(page).locator('.readout').getAttribute('class'), 'readout');
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('a run ends as it was asked to, whatever the run after it asks: a runaway is ended, a kept worker kept', async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  // Two calls held in the worker: one for a minute (a runaway), one for a second.
  await page.addInitScript(holdWorkers((data) => data.name === 'formatFixed' && data.args[0] === 6.8, 60000));
  await page.addInitScript(holdWorkers((data) => data.name === 'formatFixed' && data.args[0] === 4.7, 1000));
  await page.goto(`${PAGE_URL}#bench`);
  await ready(page);
  const runs = await page.evaluate(async () => {
    const { run, startedIn } = HR.background;
    // A runaway that may end its worker, superseded by a run that keeps its own: the
    // runaway's worker is ended, and the kept run answers from a fresh one at once.
    const runaway = run('formatFixed', [6.8, 1], { lane: 'probe' });
    const kept = run('formatFixed', [2.2, 1], { lane: 'probe', keep: true });
    const first = [await runaway.promise, await kept.promise, startedIn.probe];
    // A kept run superseded by one that does not keep: the kept run's worker finishes
    // its call and then answers the next, no worker started.
    const slow = run('formatFixed', [4.7, 1], { lane: 'probe', keep: true });
    const next = run('formatFixed', [3.3, 1], { lane: 'probe' });
    return [...first, await slow.promise, await next.promise, startedIn.probe];
  });
  assert.deepEqual(runs, [{ cancelled: true }, runs[1], 2, { cancelled: true }, runs[4], 2]);
  assert.equal(runs[1].ok, '2.2');
  assert.equal(runs[4].ok, '3.3');
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('a drag on Stage keeps its worker and follows it; a runaway behind the drag is ended after a grace', async () => {
  const { page, seen } = await stagePage();
  // A drag: R fb set thirty times, one value a frame. The lane keeps its worker (the
  // stale run, a few milliseconds, finishes and the latest goes in): no worker started.
  const drag = await page.evaluate(async () => {
    const started = HR.background.startedIn.stage;
    const n = Number(document.getElementById('panel-stage').dataset.computed);
    const values = ['2k0', '2k2', '2k4', '2k7', '3k0', '3k3', '3k6', '3k9', '4k3', '4k7'];
    for (let i = 0; i < 30; i++) {
      HR.design.set('stage', 'r_fb_ohm', values[i % 10], 'drag');
      await new Promise((resolve) => requestAnimationFrame(resolve));
    }
    return { started, n };
  });
  await page.waitForSelector('#panel-stage[data-follow="settled"]', { state: 'attached' });
  assert.equal(await page.evaluate(() => HR.background.startedIn.stage), drag.started, 'no worker started by the drag');
  assert.ok(Number(await stage(page).getAttribute('data-computed')) > drag.n);
  assert.match(await stage(page).locator('button.value[data-key="r_fb_ohm"]').textContent(), /4k7/);
  assert.equal(await stage(page).locator('.stale-note').isVisible(), false, 'the figures on show are the last value’s');

  // A runaway (R fb = 6k8, held for a minute) superseded by an edit: the edit waits
  // behind it for the grace, then its worker is ended and the edit computes afresh.
  const ended = (await workLog(page)).terminated;
  const n = Number(await stage(page).getAttribute('data-computed'));
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '6k8', 'runaway'));
  await page.waitForSelector('#panel-stage[data-follow="running"]', { state: 'attached' });
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '5k6', 'after'));
  await page.waitForSelector(`#panel-stage[data-computed="${n + 1}"][data-follow="settled"]`, { state: 'attached', timeout: 30000 });
  assert.ok((await workLog(page)).terminated > ended, 'the runaway’s worker was ended');
  assert.equal(await page.evaluate(() => HR.background.startedIn.stage), drag.started + 1, 'one fresh worker');
  assert.equal(await stage(page).locator('.stale-note').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

// Seed 12452043 of the domain property suite (tests/domain.rs): seven square-law
// inverters with an R fb of 7.5 MΩ, whose loop analysis (the compensation helper
// above all) takes about a second in wasm.
const SLOW = {
  analysis: { f_design_hz: 19948.919688554623, f_start_hz: 2647.9338239252356, f_stop_hz: 1482104.61193397, input_dbm: -34.146330077982924, points_per_decade: 17, z0_ohm: 75.0 },
  chain: { bandwidth_hz: 10000.0, blocks: [{ kind: 'pad', loss_db: 2 }, { kind: 'stage' }, { dc_w: 0.2, gain_db: 15, kind: 'amp', nf_db: 4, oip3_dbm: 25, op1db_dbm: 12 }], input_dbm: -60 },
  halfrail: 1,
  part: { cdb_f: 3.8159087297436204e-12, cgd_f: 1.257395228772477e-12, cgs_f: 6.288656800807326e-13, kn_a_per_v2: 0.002632576929109779, kp_a_per_v2: 0.00029121670527895873, lambda_n_per_v: 0.19878698242081325, lambda_p_per_v: 0.10380912973684131, model: 'square-law', stages: 7, temp_c: 39.08188987054106, vdd_v: 2.6493389587469425, vtn_v: 0.34431919162632274, vtp_v: -0.8999529708124936 },
  stage: { c_in_f: 1.3359451056436156e-11, c_out_f: 0.0005211150181555228, r_fb_ohm: 7506247.6472799145, r_in_ohm: 4.906881488656126, source_ohm: 16.291686929934684 },
  target: { gain_db: 9.170376424852664, gain_kind: 'voltage', gain_tol_db: 2.7370859462990937, match_source: true, series: 'E192' },
  title: 'domain 12452043',
  tolerance: { capacitor_pct: 17.784224117915045, k_pct: 0.36942648918887766, resistor_pct: 7.65137943248265, seed: 12452043, trials: 8, vdd_pct: 2.6413148827171606, vt_mv: 34.61066692431223 },
};

test('a legal design whose loop analysis is slow computes in the background while the page draws', async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.addInitScript(instrumentWork);
  await page.goto(`${PAGE_URL}#loop`);
  await ready(page);
  await page.waitForSelector('#panel-loop[data-computed="1"]');
  // Count the frames drawn while the Loop panel's run goes (from the moment it says
  // 'running' to the moment it settles).
  await page.evaluate(() => {
    const panel = document.getElementById('panel-loop');
    window.__during = { frames: 0, running: false, runs: 0 };
    new MutationObserver(() => {
      const running = panel.dataset.follow === 'running';
      if (running && !window.__during.running) window.__during.runs += 1;
      window.__during.running = running;
    }).observe(panel, { attributes: true, attributeFilter: ['data-follow'] });
    const tick = () => { if (window.__during.running) window.__during.frames += 1; requestAnimationFrame(tick); };
    requestAnimationFrame(tick);
  });
  await page.getByLabel('Design file to open').setInputFiles({ name: 'slow.halfrail.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(SLOW)) });
  await page.waitForSelector('#panel-loop[data-computed="2"][data-follow="settled"]', { state: 'attached', timeout: 60000 });
  const during = await page.evaluate(() => window.__during);
  assert.equal(during.runs, 1);
  assert.ok(during.frames >= 2, `frames drawn during the run: ${during.frames}`);
  // The slow design's verdict is on show, not marked stale.
  assert.notEqual(await page.locator('#panel-loop .verdict-head').textContent(), '—');
  assert.equal(await page.locator('#panel-loop .stale-note').isVisible(), false);
  assert.equal(await page.locator('#panel-loop .run').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
