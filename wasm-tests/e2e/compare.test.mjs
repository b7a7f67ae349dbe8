// Compare in Chromium from file://: the demo pinned as the reference, r_fb changed,
// then every plot of Part, Response, Loop and Chain carries the reference's curves,
// equal to the core's entries called on the pinned text in the page; the figures
// cards give the reference's value and this design less it; the reference survives a
// reload and an undo, Clear takes every overlay away, a draft with a bad value is not
// pinned, Swing says the reference is not computed until asked, and nothing is fetched.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, ready } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const show = async (page, id) => {
  await page.locator(`#rail a[href="#${id}"]`).click();
  await page.waitForSelector(`#panel-${id}[data-computed]`);
};
// Waits until `panel` has rendered once more than `before` results.
const computedAfter = (page, id, before) => page.waitForFunction(([id, n]) => Number(document.getElementById(`panel-${id}`).dataset.computed) > n,
  [id, before]);
const computed = (page, id) => page.evaluate((id) => Number(document.getElementById(`panel-${id}`).dataset.computed || 0), id);

// Checks, in the page, each uPlot figure of `id` against `expected(thisReport, refReport)`
// → per figure [rx, ...rys] (the reference's own x and series): the reference series
// follow the plot's own, labelled "reference"; with the same x they equal the core's
// values exactly, else every value of the reference inside the plot's x range lies
// between the core's values either side of it, and its points beyond that range are
// the core's own. `entry` and `args` say which core call gives the report.
const checkOverlays = (page, id, entry, args, expected) => page.evaluate(({ id, entry, args, expected }) => {
  const pinned = HR.compare.text();
  const refReport = HR.call(entry, pinned, ...args).ok;
  const want = new Function(`return (${expected})`)()(refReport);
  const figs = [...document.querySelectorAll(`#panel-${id} figure.plot`)].filter((f) => f.uplot && !f.hidden);
  const problems = [];
  if (figs.length !== want.length) problems.push(`${figs.length} plots, ${want.length} expected`);
  figs.forEach((f, p) => {
    const u = f.uplot;
    const [rx, ...rys] = want[p];
    const n = rys.length;
    const own = u.series.length - 1 - n;
    const labels = u.series.slice(own + 1).map((s) => s.label);
    if (!labels.every((l) => /^reference/.test(l))) problems.push(`plot ${p}: labels ${labels}`);
    const x = u.data[0];
    rys.forEach((ry, j) => {
      const got = u.data[own + 1 + j];
      if (f.dataset.reference === 'same-x') {
        if (x.length !== rx.length || x.some((v, i) => v !== rx[i]) || got.some((v, i) => v !== ry[i])) problems.push(`plot ${p} series ${j}: not the core's values`);
        return;
      }
      if (f.dataset.reference !== 'resampled') { problems.push(`plot ${p}: reference ${f.dataset.reference}`); return; }
      x.forEach((v, i) => {
        const k = rx.findIndex((q) => q >= v);
        if (k < 0) return;
        if (rx[k] === v) { if (got[i] !== ry[k]) problems.push(`plot ${p} at ${v}: ${got[i]} not ${ry[k]}`); return; }
        if (k === 0 || got[i] === null) return;
        const [lo, hi] = [Math.min(ry[k - 1], ry[k]), Math.max(ry[k - 1], ry[k])];
        if (!(got[i] >= lo - 1e-12 * Math.abs(lo) && got[i] <= hi + 1e-12 * Math.abs(hi))) problems.push(`plot ${p} at ${v}: ${got[i]} outside ${lo} … ${hi}`);
      });
    });
  });
  return { problems: problems.slice(0, 5), plots: figs.length };
}, { id, entry, args, expected: expected.toString() });

// The text a figure's difference is shown with: this less the reference through the
// page's formatter, signed.
const expectedDelta = (page, a, b, unit) => page.evaluate(([a, b, unit]) => {
  const t = HR.fmt(a - b, unit, 3);
  return a - b > 0 && /[1-9]/.test(t) ? `+${t}` : t;
}, [a, b, unit]);

const referenceSeries = (page, id) => page.evaluate((id) => [...document.querySelectorAll(`#panel-${id} figure.plot`)]
  .filter((f) => f.uplot).map((f) => f.uplot.series.filter((s) => /^reference/.test(s.label)).length), id);

test('a pinned reference is drawn under every plot, and the figures show it and the difference', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.getByRole('button', { name: 'Pin as reference' }).click();
  const demo = await page.evaluate(() => HR.design.text());
  assert.equal(await page.evaluate(() => HR.compare.text()), demo);
  assert.match(await page.locator('.ref-badge').textContent(), /^Reference: Demo: 10\.7 MHz/);
  assert.equal(await page.locator('.ref-badge').isVisible(), true);

  let n = await computed(page, 'part');
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '3k3'));
  await computedAfter(page, 'part', n);
  assert.notEqual(await page.evaluate(() => HR.design.text()), demo);

  // Part: the bare curve shares the reference's x; the stage's curve (Vin at the pins) does not.
  let r = await checkOverlays(page, 'part', 'partReport', [501], (p) => [
    [p.bare.points.map((q) => q.vin_v), p.bare.points.map((q) => q.vout_v)],
    [p.closed.map((q) => q.vin_v), p.closed.map((q) => q.vout_v)]]);
  assert.deepEqual(r.problems, []);
  assert.deepEqual(await page.evaluate(() => [...document.querySelectorAll('#panel-part figure.plot')].map((f) => f.dataset.reference)), ['same-x', 'resampled']);
  // Part: the operating point's figures carry the reference's and the difference.
  const op = await page.evaluate(() => [HR.call('partReport', HR.design.text(), 501).ok.bias, HR.call('partReport', HR.compare.text(), 501).ok.bias]);
  const vinLine = await page.locator('#panel-part dd[data-key="vin"] .vs').textContent();
  assert.ok(vinLine.startsWith(`ref ${await page.evaluate((v) => HR.fmt(v, 'V', 4), op[1].vin_v)}`), vinLine);
  assert.ok(vinLine.endsWith(`Δ ${await expectedDelta(page, op[0].vin_v, op[1].vin_v, 'V')}`), vinLine);
  assert.ok((await page.locator('#panel-part dd[data-key="iq"] .vs').textContent()).endsWith(`Δ ${await expectedDelta(page, op[0].iq_a, op[1].iq_a, 'A')}`));
  assert.match(await page.locator('#panel-part dd[data-key="sat"] .vs').textContent(), /^ref \S.* … /);

  // Response: six plots on the same analysis frequencies, exactly the core's values.
  await show(page, 'response');
  r = await checkOverlays(page, 'response', 'responseReport', [], (x) => [
    [x.f_hz, x.gain_db, x.gt_db], [x.f_hz, x.phase_unwrapped_deg], [x.f_hz, x.zin_re_ohm, x.zin_im_ohm],
    [x.f_hz, x.rl_db], [x.f_hz, x.nf_db], [x.f_hz, x.noise_in_v_per_rthz]]);
  assert.deepEqual(r.problems, []);
  assert.equal(r.plots, 6);
  const gains = await page.evaluate(() => {
    const now = HR.call('responseReport', HR.design.text()).ok.design;
    const ref = HR.call('responseReport', HR.compare.text()).ok.design;
    return { now: now.gain_db, ref: ref.gain_db, shownRef: HR.fmt(ref.gain_db, 'dB'), nowHigh: now.f_high_hz, refHigh: ref.f_high_hz };
  });
  const gainLine = await page.locator('#panel-response dd[data-key="gain"] .vs').textContent();
  assert.ok(gainLine.startsWith(`ref ${gains.shownRef} (`), gainLine);
  assert.ok(gainLine.includes(`Δ ${await expectedDelta(page, gains.now, gains.ref, 'dB')}, `), gainLine);
  assert.ok(gains.now !== gains.ref);
  const bandLine = await page.locator('#panel-response dd[data-key="band"] .vs').textContent();
  const ratio = await page.evaluate(([a, b]) => `×${HR.fixed(a / b, 3)}`, [gains.nowHigh, gains.refHigh]);
  assert.ok(bandLine.endsWith(`, ${ratio}`), `${bandLine} ends with ${ratio}`);
  assert.equal(await page.locator('#panel-response .vs-note').isVisible(), true);

  // Stage: the key figures.
  await show(page, 'stage');
  const stageGain = await page.locator('#panel-stage dd[data-key="gain"] .vs').textContent();
  assert.ok(stageGain.endsWith(`Δ ${await expectedDelta(page, gains.now, gains.ref, 'dB')}`), stageGain);
  const iq = await page.evaluate(() => [HR.call('biasOf', HR.design.text()).ok.iq_a, HR.call('biasOf', HR.compare.text()).ok.iq_a]);
  assert.ok((await page.locator('#panel-stage dd[data-key="iq"] .vs').textContent()).endsWith(`Δ ${await expectedDelta(page, iq[0], iq[1], 'A')}`));

  // Loop: |T|, ∠T (same frequencies), the step (its own time grid) and μ; the Nyquist
  // plot and the pole map draw the reference's points.
  await show(page, 'loop');
  r = await checkOverlays(page, 'loop', 'loopReport', [], (x) => {
    const m = Math.min(x.step_t_s.length, x.step_v.length);
    return [[x.f_hz, x.t_db], [x.f_hz, x.t_phase_deg], [x.step_t_s.slice(0, m), x.step_v.slice(0, m)], [x.f_hz, x.mu]];
  });
  assert.deepEqual(r.problems, []);
  const planes = await page.evaluate(() => {
    const ref = HR.call('loopReport', HR.compare.text()).ok;
    return { want: [String(ref.t_re.length), String(ref.summary.poles_hz.length)],
      got: [...document.querySelectorAll('#panel-loop figure.plane')].map((f) => f.dataset.reference) };
  });
  assert.deepEqual(planes.got, planes.want);
  const loop = await page.evaluate(() => [HR.design.text(), HR.compare.text()].map((t) => HR.call('loopReport', t).ok.summary));
  const tMid = await page.locator('#panel-loop dd[data-key="t_mid"] .vs').textContent();
  assert.ok(tMid.includes(`Δ ${await expectedDelta(page, loop[0].t_mid_db, loop[1].t_mid_db, 'dB')}, `), tMid);
  const settling = await page.evaluate(([a, b]) => `×${HR.fixed(a / b, 3)}`, [loop[0].settling_s, loop[1].settling_s]);
  assert.ok((await page.locator('#panel-loop dd[data-key="settling"] .vs').textContent()).endsWith(`Δ ${settling}`));
  // Both designs cross below f_design (SPEC §3.3 reads every crossover from the
  // bottom of the sweep): the reference's phase margin is given beside this one's.
  assert.ok(loop[0].phase_margin_deg !== null && loop[1].phase_margin_deg !== null, JSON.stringify(loop.map((l) => l.phase_margin_deg)));
  assert.match(await page.locator('#panel-loop dd[data-key="pm"] .vs').textContent(), /^ref -?\d+\.\d°/);

  // Chain: the level diagram and the totals, the reference's stage block computed from its text.
  await page.locator('#rail a[href="#chain"]').click();
  await page.waitForFunction(() => {
    const f = document.querySelector('#panel-chain figure.chain-levels');
    return f && f.uplot && f.uplot.series.some((s) => /^reference/.test(s.label)) && document.getElementById('panel-chain').dataset.stage === 'ready';
  }, null, { timeout: 30000 });
  const chain = await page.evaluate(() => {
    const doc = (t) => { const d = JSON.parse(t); return JSON.stringify({ halfrail: d.halfrail, part: d.part, stage: d.stage, analysis: d.analysis }); };
    const budget = (t) => HR.call('chainReport', t, JSON.stringify(wasm_bindgen.stageBlock(doc(t)))).ok;
    const [now, ref] = [budget(HR.design.text()), budget(HR.compare.text())];
    const levels = (x) => [[0, ...x.stages.map((_, i) => i + 1)], [x.input_dbm, ...x.stages.map((s) => s.signal_dbm)],
      [x.input_noise_dbm, ...x.stages.map((s) => s.noise_dbm)], [null, ...x.stages.map((s) => s.op1db_dbm)], [null, ...x.stages.map((s) => s.oip3_dbm)]];
    const f = document.querySelector('#panel-chain figure.chain-levels');
    return { data: f.uplot.data, mode: f.dataset.reference, want: [...levels(now), ...levels(ref).slice(1)],
      gain: [now.gain_db, ref.gain_db], line: document.querySelector('#panel-chain dd[data-key="gain_db"] .vs').textContent };
  });
  assert.equal(chain.mode, 'same-x');
  assert.deepEqual(chain.data, chain.want);
  assert.ok(chain.line.endsWith(`Δ ${await expectedDelta(page, chain.gain[0], chain.gain[1], 'dB')}`), chain.line);
  assert.notEqual(chain.gain[0], chain.gain[1]);

  // Undo takes the design back, not the reference: the differences are then nothing.
  await page.evaluate(() => HR.design.undo());
  await page.waitForFunction(() => document.querySelector('#panel-chain dd[data-key="gain_db"] .vs').textContent.endsWith('Δ 0.00 dB'));
  assert.equal(await page.evaluate(() => HR.compare.text()), demo);
  assert.equal(await page.evaluate(() => HR.design.text()), demo);

  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the reference survives a reload; Clear takes every overlay away; a bad draft is not pinned', async () => {
  const { page, seen } = await openPanel(browser.context, 'response');
  await page.getByRole('button', { name: 'Pin as reference' }).click();
  const pinned = await page.evaluate(() => HR.compare.text());
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '1k8'));
  await page.reload();
  await ready(page);
  await page.waitForSelector('#panel-response[data-computed]');
  assert.equal(await page.evaluate(() => HR.compare.text()), pinned);
  assert.equal(await page.locator('.ref-badge').isVisible(), true);
  assert.deepEqual(await referenceSeries(page, 'response'), [2, 1, 2, 1, 1, 1]);
  assert.equal(await page.locator('#panel-response .vs').count(), 10);
  const stored = await page.evaluate(() => JSON.parse(localStorage.getItem('halfrail.v1.reference')).text);
  assert.equal(stored, pinned);
  // Not part of the design: neither in the draft nor in its history.
  assert.equal(await page.evaluate(() => HR.design.text().includes('reference')), false);

  await page.getByRole('button', { name: 'Clear reference' }).click();
  assert.deepEqual(await referenceSeries(page, 'response'), [0, 0, 0, 0, 0, 0]);
  assert.equal(await page.locator('#panel-response .vs').count(), 0);
  assert.equal(await page.locator('#panel-response .vs-note').isVisible(), false);
  assert.equal(await page.locator('.ref-badge').isVisible(), false);
  assert.equal(await page.getByRole('button', { name: 'Clear reference' }).isVisible(), false);
  assert.equal(await page.evaluate(() => localStorage.getItem('halfrail.v1.reference')), 'null');

  await page.evaluate(() => HR.design.set('part', 'cgs_f', '4 uH'));
  await page.getByRole('button', { name: 'Pin as reference' }).click();
  assert.match(await page.locator('#engine-status').textContent(), /^Not pinned as the reference: Cgs: /);
  assert.equal(await page.evaluate(() => HR.compare.text()), null);
  assert.equal(await page.locator('.ref-badge').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a reference pinned or cleared in another tab shows here too', async () => {
  const { page: here, seen } = await openPanel(browser.context, 'response');
  const { page: there } = await openPanel(browser.context, 'stage');
  await there.getByRole('button', { name: 'Pin as reference' }).click();
  await here.waitForFunction(() => HR.compare.text() !== null);
  assert.equal(await here.evaluate(() => HR.compare.text()), await there.evaluate(() => HR.compare.text()));
  assert.equal(await here.locator('.ref-badge').isVisible(), true);
  await here.waitForFunction(() => document.querySelectorAll('#panel-response .vs').length === 10);
  assert.deepEqual(await referenceSeries(here, 'response'), [2, 1, 2, 1, 1, 1]);
  await there.getByRole('button', { name: 'Clear reference' }).click();
  await here.waitForFunction(() => HR.compare.text() === null);
  assert.equal(await here.locator('.ref-badge').isVisible(), false);
  assert.equal(await here.locator('#panel-response .vs').count(), 0);
  assert.deepEqual(seen.errors, []);
  await there.close();
  await here.close();
});

test('Swing and Spread compute the reference only when asked, in a lane of their own', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.getByRole('button', { name: 'Pin as reference' }).click();
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '3k3'));
  await show(page, 'swing');
  const line = page.locator('#panel-swing .vs-line');
  assert.match(await line.textContent(), /^Reference not computed here\./);
  assert.equal(await page.locator('#panel-swing .vs').count(), 0);
  await line.getByRole('button', { name: 'Compute the reference too' }).click();
  await page.waitForSelector('#panel-swing dd[data-key="hd2"] .vs', { timeout: 60000 });
  assert.match(await line.textContent(), /^Reference “Demo: 10\.7 MHz/);
  assert.match(await page.locator('#panel-swing dd[data-key="op1db"] .vs').textContent(), /^ref -?\d.* dBm · Δ [+-]?\d+\.\d+ dB$/);
  // Spread: its own run, for this design only; the reference's yield once asked.
  await page.locator('#rail a[href="#spread"]').click();
  await page.waitForSelector('#panel-spread[data-computed]', { timeout: 60000 });
  assert.match(await page.locator('#panel-spread .vs-line').textContent(), /^Reference not computed here\./);
  await page.locator('#panel-spread .vs-line button').click();
  await page.waitForSelector('#panel-spread [data-key="yield"] .vs', { timeout: 120000 });
  assert.match(await page.locator('#panel-spread [data-key="yield"] .vs').textContent(), /^ref \d+\.\d % · Δ [+-]?\d+\.\d+ %$/);
  // Pinning the design on show takes the panel's own result: nothing to compute.
  await page.getByRole('button', { name: 'Pin as reference' }).click();
  assert.match(await page.locator('#panel-spread .vs-line').innerText(), /^Reference “.*” shown beside the figures\.$/);
  assert.equal(await page.locator('#panel-spread .vs-line button').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});
