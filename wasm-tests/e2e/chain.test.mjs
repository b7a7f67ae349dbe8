// The Chain panel in Chromium from file://, on the demo's chain (a ceramic filter, the
// stage, a pad and a buffer amplifier): the table after each block and the totals agree
// with the native CLI (`halfrail chain`) on the same document at the precision shown;
// the stage block's own figures come from one background run, not redone for chain
// edits; adding, removing, moving and editing a block each change the budget and are
// one step of undo; a bad value is reported beside its field while the last budget
// stays on show, marked stale; the level diagram has its series; the CSV has one row
// per block; stages next to each other are compared both ways and the budget follows
// the choice; the core's warnings are listed. No network request throughout.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import { launch, watch, ready, clearStorage, PAGE_URL, cli, undoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const cliChain = (text) => cli('chain', text);

// Counts the background runs the page starts, by entry: installed once the page is
// ready on the Bench panel, which starts none, so before the Chain panel mounts. (HR
// is a global `const` of the page's script, not a property of window.) The printed
// sheet's runs (lane `sheet`, prepared after every change whatever panel is shown)
// are not the panels': left out, as the e2e tests count workers (browser.mjs).
const instrument = () => {
  window.__runs = [];
  const run = HR.background.run;
  HR.background.run = (name, args, opts) => {
    if (!(opts && opts.lane === 'sheet')) window.__runs.push(name);
    return run(name, args, opts);
  };
  window.__counting = true;
};

async function openChain() {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.goto(`${PAGE_URL}#bench`);
  await ready(page);
  await page.evaluate(instrument);
  assert.equal(await page.evaluate(() => window.__counting), true, 'the background runs are counted');
  await page.locator('#rail a[href="#chain"]').click();
  await page.waitForSelector('#panel-chain[data-computed]', { timeout: 20000 });
  return { page, seen };
}

const panel = (page) => page.locator('#panel-chain');
const computed = (page) => panel(page).getAttribute('data-computed').then(Number);
const recomputed = (page, n) => page.waitForFunction((m) => Number(document.getElementById('panel-chain').dataset.computed) > m, n, { timeout: 20000 });
const text = (page) => page.evaluate(() => HR.design.text());
const chain = (page) => page.evaluate(() => JSON.parse(JSON.stringify(HR.design.section('chain'))));
const total = (page, key) => page.locator(`#panel-chain dd[data-key="${key}"]`).textContent();
const afterRows = (page) => page.locator('#panel-chain table.chain-after tbody tr');
const blockRows = (page) => page.locator('#panel-chain table.chain-blocks tbody tr');
const blockInput = (page, row, key) => page.locator(`#panel-chain table.chain-blocks input[data-row="${row}"][data-key="${key}"]`);
const runs = (page) => page.evaluate(() => window.__runs.slice());

// A figure as the page shows it: fixed decimals, no negative zero (formatFixed).
const f = (v, d = 2) => (v === null ? '—' : ((s) => (/^-0\.?0*$/.test(s) ? s.slice(1) : s))(v.toFixed(d)));
const pct = (v) => `${f(100 * v, 1)} %`;
// The table's row for one row of the CLI's `stages`, in the page's columns.
const rowOf = (s, i) => [s.name, f(s.gain_db), f(s.nf_db), f(s.iip3_dbm), f(s.oip3_dbm), f(s.ip1db_dbm), f(s.signal_dbm),
  f(s.noise_dbm), f(s.snr_db), f(s.headroom_db), pct(s.noise_share), pct(s.distortion_share)];
const pageRows = (page) => afterRows(page).evaluateAll((trs) => trs.map((tr) => [...tr.children].map((c) => c.textContent)));

// The panel's budget agrees with the CLI's on the document the page holds.
async function matchesCli(page) {
  const c = cliChain(await text(page));
  const shown = await pageRows(page);
  assert.equal(shown.length, c.stages.length, 'one row per row of the budget');
  c.stages.forEach((s, i) => {
    const [a, b] = s.blocks || [i, i];
    assert.deepEqual(shown[i], [a === b ? String(a + 1) : `${a + 1}–${b + 1}`, ...rowOf(s, i)], `row ${i + 1}`);
  });
  for (const [k, unit] of [['gain_db', 'dB'], ['nf_db', 'dB'], ['iip3_dbm', 'dBm'], ['oip3_dbm', 'dBm'], ['ip1db_dbm', 'dBm'],
    ['noise_floor_in_dbm', 'dBm'], ['snr_db', 'dB'], ['sfdr_db', 'dB'], ['output_dbm', 'dBm'], ['mds_dbm', 'dBm']]) {
    assert.equal(await total(page, k), c[k] === null ? '—' : `${f(c[k])} ${unit}`, k);
  }
  assert.equal(await total(page, 'noise_temp_k'), `${f(c.noise_temp_k, 0)} K`);
  assert.equal(await total(page, 'dc_w'), await page.evaluate((v) => HR.fmt(v, 'W', 3), c.dc_w));
  return c;
}

test('the demo chain: the budget after each block and the totals agree with halfrail chain; the stage computes once in the background', async () => {
  const { page, seen } = await openChain();
  const c = await matchesCli(page);
  assert.equal(c.stages.length, 4);
  assert.deepEqual(await runs(page), ['stageBlock'], 'one background run, for the stage block');
  assert.equal(await panel(page).getAttribute('data-stage'), 'ready');
  // The stage's own figures, read-only in its row, are what the budget used: its gain
  // is the cumulative gain after it less the filter's loss before it.
  const stageRow = blockRows(page).nth(1);
  assert.equal(await stageRow.getAttribute('data-kind'), 'stage');
  const block = await page.evaluate((t) => wasm_bindgen.stageBlock(JSON.stringify((({ halfrail, part, stage, analysis }) => ({ halfrail, part, stage, analysis }))(JSON.parse(t)))), await text(page));
  assert.deepEqual(await stageRow.locator('.computed').allTextContents(), ['—', f(block.gain_db), f(block.nf_db), f(block.oip3_dbm), f(block.op1db_dbm),
    await page.evaluate((v) => HR.fmt(v, 'W', 3), block.dc_w)]);
  assert.ok(Math.abs(c.stages[1].gain_db - c.stages[0].gain_db - block.gain_db) < 1e-9);
  assert.equal(await stageRow.locator('input').count(), 1, 'only its name is typed');
  // Which blocks set the noise and the distortion (the largest shares).
  const top = (k) => c.stages.reduce((a, s) => (s[k] > a[k] ? s : a));
  assert.match(await panel(page).locator('.chain-sets').textContent(),
    new RegExp(`noise comes from ${top('noise_share').name} \\(${f(100 * top('noise_share').noise_share, 1)} %.*distortion comes from ${top('distortion_share').name}`));
  assert.match(await panel(page).textContent(), /common approximation/, 'the IP1dB cascade is said to be an approximation');
  // The chain's own fields.
  assert.equal(await panel(page).getByLabel('Input level', { exact: true }).inputValue(), '-60');
  assert.equal(await panel(page).getByLabel('Noise bandwidth', { exact: true }).inputValue(), '230 kHz');
  // Chain edits do not run the stage again.
  const n = await computed(page);
  await panel(page).getByLabel('Input level', { exact: true }).fill('-50');
  await recomputed(page, n);
  await matchesCli(page);
  assert.deepEqual(await runs(page), ['stageBlock']);
  // A change to the stage does, once; its row says it is computing meanwhile.
  // What the stage's row says while it computes: caught by an observer as the page
  // writes it, however soon the run ends.
  const during = await page.evaluate(() => new Promise((resolve) => {
    const table = document.querySelector('#panel-chain table.chain-blocks');
    const look = () => {
      const row = table.querySelectorAll('tbody tr')[1];
      if (row?.dataset.stage !== 'computing') return;
      observer.disconnect();
      resolve([row.dataset.stage, row.textContent, document.querySelector('#panel-chain .stale-note').dataset.why]);
    };
    const observer = new MutationObserver(look);
    observer.observe(table, { subtree: true, childList: true, characterData: true, attributes: true });
    HR.design.set('stage', 'r_fb_ohm', '3k9', 'test');
  }));
  assert.equal(during[0], 'computing');
  assert.match(during[1], /computing…/);
  assert.equal(during[2], 'stage');
  await page.waitForSelector('#panel-chain[data-stage="ready"]');
  await page.waitForFunction(() => document.querySelector('#panel-chain .stale-note').hidden);
  assert.deepEqual(await runs(page), ['stageBlock', 'stageBlock']);
  await matchesCli(page);
  assert.doesNotMatch(await panel(page).textContent(), /NaN|undefined|Infinity/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('adding, removing, moving and editing a block each change the budget; one Undo takes each back', async () => {
  const { page, seen } = await openChain();
  const original = await chain(page);
  const gain = await total(page, 'gain_db');
  const undo = undoButton(page);
  const step = async (action, check, { withCli = true } = {}) => {
    const n = await computed(page);
    await action();
    await recomputed(page, n);
    if (withCli) await matchesCli(page);
    await check();
    const m = await computed(page);
    await undo.click();
    await recomputed(page, m);
    assert.deepEqual(await chain(page), original, 'one undo restores the chain');
    assert.equal(await total(page, 'gain_db'), gain);
  };

  // Add a pad: a fifth block, 3 dB less gain; the new row's name field has the focus.
  await step(() => panel(page).getByRole('button', { name: 'Add a pad' }).click(), async () => {
    assert.equal(await blockRows(page).count(), 5);
    assert.equal((await chain(page)).blocks[4].kind, 'pad');
    assert.equal(await page.evaluate(() => document.activeElement.dataset.row + document.activeElement.dataset.key), '4name');
    assert.equal(await page.evaluate(() => HR.design.undoLabel()), 'add a pad');
  });
  // A block of one's own: an amplifier with the name typed.
  await step(async () => {
    await panel(page).getByLabel('Name of a block of your own').fill('Cable run');
    await panel(page).getByRole('button', { name: 'Add a block of your own' }).click();
  }, async () => {
    assert.deepEqual((await chain(page)).blocks[4], { kind: 'amp', name: 'Cable run', gain_db: 0, nf_db: 0 });
    assert.equal((await pageRows(page))[4][1], 'Cable run');
    assert.equal(await total(page, 'gain_db'), gain, 'a block of 0 dB gain and 0 dB NF changes no gain');
  }, { withCli: false });
  // Remove the pad (block 3).
  await step(() => panel(page).getByRole('button', { name: 'Remove block 3 (pad 3)' }).click(), async () => {
    assert.deepEqual((await chain(page)).blocks.map((b) => b.kind), ['filter', 'stage', 'amp']);
    assert.notEqual(await total(page, 'gain_db'), gain);
  });
  // Move the buffer up, from the keyboard: the focus follows the block.
  await step(async () => {
    await panel(page).getByRole('button', { name: 'Move block 4 (Detector buffer) up' }).focus();
    await page.keyboard.press('Enter');
  }, async () => {
    assert.deepEqual((await chain(page)).blocks.map((b) => b.kind), ['filter', 'stage', 'amp', 'pad']);
    assert.equal(await page.evaluate(() => document.activeElement.getAttribute('aria-label')), 'Move block 3 (Detector buffer) up');
  });
  // Edit the buffer's gain in place: 12 → 15 dB, applied by Enter.
  await step(async () => {
    await blockInput(page, 3, 'gain_db').fill('15');
    await blockInput(page, 3, 'gain_db').press('Enter');
  }, async () => {
    assert.equal((await chain(page)).blocks[3].gain_db, '15');
    assert.equal(await total(page, 'gain_db'), `${f(parseFloat(gain) + 3)} dB`);
  });
  assert.equal(await blockInput(page, 3, 'gain_db').inputValue(), '12', 'the field shows the undone value');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a bad value is reported beside its field; the last budget stays, marked stale', async () => {
  const { page, seen } = await openChain();
  const rows = await pageRows(page);
  const gain = await total(page, 'gain_db');
  const input = blockInput(page, 3, 'gain_db');
  await input.fill('12 dBx');
  await input.press('Enter');
  const c = await page.evaluate(() => HR.call('chainReport', HR.design.text(), ''));
  assert.equal(c.error.field, 'chain.blocks[3].gain_db');
  assert.equal(await input.getAttribute('aria-invalid'), 'true');
  const beside = input.locator('xpath=following-sibling::span[@class="error"]');
  assert.equal(await beside.textContent(), c.error.reason);
  assert.equal(await panel(page).locator('.chain-problem').textContent(), `Block 4 (Detector buffer): ${c.error.reason}`);
  assert.equal(await panel(page).locator('.stale-note').isVisible(), true);
  assert.equal(await panel(page).locator('.stale-note').getAttribute('data-why'), 'error');
  assert.deepEqual(await pageRows(page), rows, 'the last budget stays');
  assert.equal(await total(page, 'gain_db'), gain);
  // Out of range, at a chain field: the rule and the value.
  const level = panel(page).getByLabel('Input level', { exact: true });
  await input.fill('12');
  await input.press('Enter');
  await level.fill('75');
  assert.equal(await level.getAttribute('aria-invalid'), 'true');
  assert.match(await panel(page).locator('.field .error').first().textContent(), /must be ≤ 60, got 75/);
  assert.equal(await input.getAttribute('aria-invalid'), 'false');
  const n = await computed(page);
  await level.fill('-40');
  await recomputed(page, n);
  assert.equal(await panel(page).locator('.stale-note').isVisible(), false);
  await matchesCli(page);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the level diagram has its series; the CSV has one row per block, as the CLI', async () => {
  const { page, seen } = await openChain();
  const plot = panel(page).locator('figure.chain-levels');
  assert.equal(await plot.getAttribute('data-series'), 'Signal|Noise|Output 1 dB compression|Output intercept (OIP3)');
  assert.equal(await plot.getAttribute('data-nodes'), '5', 'the input and a node after each block');
  const legend = await plot.locator('.u-legend .u-series .u-label').allTextContents();
  assert.deepEqual(legend, ['Node', 'Signal', 'Noise', 'Output 1 dB compression', 'Output intercept (OIP3)']);
  // Each series is drawn: pixels of its colour on the canvas (the theme's --plot-1 … --plot-4).
  const drawn = await plot.evaluate((fig) => {
    const canvas = fig.querySelector('canvas');
    const { data } = canvas.getContext('2d').getImageData(0, 0, canvas.width, canvas.height);
    return [1, 2, 3, 4].map((k) => {
      const hex = getComputedStyle(document.documentElement).getPropertyValue(`--plot-${k}`).trim();
      const want = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
      let n = 0;
      for (let i = 0; i < data.length; i += 4) {
        if (data[i + 3] > 200 && Math.abs(data[i] - want[0]) + Math.abs(data[i + 1] - want[1]) + Math.abs(data[i + 2] - want[2]) < 30) n++;
      }
      return n;
    });
  });
  assert.ok(drawn.every((n) => n > 50), `pixels of each series' colour: ${drawn}`);
  const c = cliChain(await text(page));
  const downloaded = page.waitForEvent('download');
  await panel(page).getByRole('button', { name: 'Save as CSV' }).click();
  const file = await downloaded;
  // Named from the design's title (the demo's), as every file the page saves.
  assert.equal(file.suggestedFilename(), 'Demo-10.7-MHz-IF-gain-block-for-a-small-lab-receiver-chain.csv');
  const lines = fs.readFileSync(await file.path(), 'utf8').trimEnd().split('\r\n');
  const keys = ['gain_db', 'nf_db', 'noise_temp_k', 'iip3_dbm', 'oip3_dbm', 'ip1db_dbm', 'signal_dbm', 'noise_dbm', 'snr_db', 'headroom_db', 'noise_share', 'distortion_share'];
  assert.equal(lines[0], ['block', 'name', ...keys].join(','));
  assert.equal(lines.length, 1 + c.stages.length, 'a header and one row per block');
  lines.slice(1).forEach((line, i) => {
    const cells = line.split(',');
    assert.equal(cells[0], String(i + 1));
    assert.equal(cells[1], c.stages[i].name);
    keys.forEach((k, j) => {
      const want = c.stages[i][k];
      if (want === null) assert.equal(cells[2 + j], '', `${k} of row ${i + 1} is empty`);
      // wasm and native libm may differ in the last bits.
      else assert.ok(Math.abs(Number(cells[2 + j]) - want) <= 1e-9 * Math.max(1, Math.abs(want)), `${k} of row ${i + 1}: ${cells[2 + j]} against ${want}`);
    });
  });
  const png = page.waitForEvent('download');
  await plot.getByRole('button', { name: 'Save “Levels along the chain” as PNG' }).click();
  assert.equal((await png).suggestedFilename(), 'Demo-10.7-MHz-IF-gain-block-for-a-small-lab-receiver-chain-levels.png');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('stages next to each other: compared as matched blocks and as one circuit; the budget follows the choice', async () => {
  const { page, seen } = await openChain();
  const card = panel(page).locator('section', { hasText: 'Stages coupled directly' });
  assert.equal(await card.isVisible(), false, 'the demo has one stage');
  // A second stage right after the first: add it, then move it up twice.
  let n = await computed(page);
  await panel(page).getByRole('button', { name: 'Add this stage' }).click();
  await recomputed(page, n);
  for (const from of [5, 4]) {
    n = await computed(page);
    await panel(page).getByRole('button', { name: new RegExp(`^Move block ${from} \\(.*\\) up$`) }).click();
    await recomputed(page, n);
  }
  assert.deepEqual((await chain(page)).blocks.map((b) => b.kind), ['filter', 'stage', 'stage', 'pad', 'amp']);
  const c = await matchesCli(page);
  assert.equal(c.runs.length, 1);
  const [run] = c.runs;
  assert.deepEqual([run.first, run.last], [1, 2]);
  assert.equal(await card.isVisible(), true);
  const cells = await card.locator('tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.children].map((x) => x.textContent)));
  const signed = (v) => `${v > 0 && f(v) !== '0.00' ? '+' : ''}${f(v)} dB`;
  assert.deepEqual(cells.map((r) => r.slice(1)), [
    ['Gain', `${f(run.matched.gain_db)} dB`, `${f(run.circuit.gain_db)} dB`, signed(run.circuit.gain_db - run.matched.gain_db)],
    ['Noise figure', `${f(run.matched.nf_db)} dB`, `${f(run.circuit.nf_db)} dB`, signed(run.circuit.nf_db - run.matched.nf_db)]]);
  assert.match(cells[0][0], /^Blocks 2–3/);
  // One circuit: the two stages are one row of the budget.
  n = await computed(page);
  await card.getByLabel('Stages next to each other').selectOption('one-circuit');
  await recomputed(page, n);
  assert.equal((await chain(page)).stage_runs, 'one-circuit');
  const one = await matchesCli(page);
  assert.equal(one.stages.length, 4);
  assert.equal((await pageRows(page))[1][0], '2–3');
  assert.equal(await panel(page).locator('figure.chain-levels').getAttribute('data-nodes'), '5');
  // Undo goes back to matched blocks.
  n = await computed(page);
  await undoButton(page).click();
  await recomputed(page, n);
  assert.equal((await chain(page)).stage_runs, undefined);
  assert.equal(await card.getByLabel('Stages next to each other').inputValue(), 'matched');
  assert.equal((await matchesCli(page)).stages.length, 5);
  assert.deepEqual(await runs(page), ['stageBlock'], 'the stage figures were computed once');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the core’s warnings are listed: a node near compression', async () => {
  const { page, seen } = await openChain();
  const list = panel(page).locator('ul.chain-warnings li');
  assert.deepEqual(await list.allTextContents(), cliChain(await text(page)).warnings.map((w) => w.text).concat(
    cliChain(await text(page)).warnings.length ? [] : ['No warnings for this chain.']));
  // Driven hard enough for the stage to compress.
  const n = await computed(page);
  await panel(page).getByLabel('Input level', { exact: true }).fill('0');
  await recomputed(page, n);
  const c = cliChain(await text(page));
  assert.ok(c.warnings.length >= 1, 'the CLI warns');
  assert.deepEqual(await list.allTextContents(), c.warnings.map((w) => w.text));
  assert.deepEqual(await list.evaluateAll((li) => li.map((x) => x.dataset.block)), c.warnings.map((w) => (w.block === null ? '' : String(w.block))));
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a design without a chain starts one with the first block added', async () => {
  const { page, seen } = await openChain();
  await page.evaluate(() => HR.design.replace('chain', undefined, 'drop the chain'));
  await page.waitForFunction(() => /This design has no chain yet/.test(document.getElementById('panel-chain').innerText));
  assert.match(await panel(page).locator('.chain-problem').textContent(), /^Chain: missing/);
  const n = await computed(page);
  await panel(page).getByRole('button', { name: 'Add a filter' }).click();
  await recomputed(page, n);
  assert.deepEqual(await chain(page), { input_dbm: -60, bandwidth_hz: '100 kHz', blocks: [{ kind: 'filter', loss_db: 2 }] });
  await matchesCli(page);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the stage block carries the design’s title, and follows it; the move and remove controls are at least 24 px', async () => {
  const { page, seen } = await openChain();
  const stageRow = blockRows(page).nth(1);
  const title = () => stageRow.locator('.stage-title').textContent();
  assert.equal(await title(), 'Demo: 10.7 MHz IF gain block for a small lab receiver');
  assert.match(await stageRow.locator('td.kind').textContent(), /^This stage/);
  // The title typed on the Brief panel: the stage block says it on coming back.
  await page.locator('#rail a[href="#brief"]').click();
  const field = page.locator('#panel-brief').getByLabel('Title', { exact: true });
  await field.fill('Second IF, 455 kHz');
  await page.locator('#rail a[href="#chain"]').click();
  await page.waitForFunction(() => document.querySelector('#panel-chain .stage-title').textContent === 'Second IF, 455 kHz');
  // No title: the block says the design is untitled.
  await page.locator('#rail a[href="#brief"]').click();
  await field.fill('');
  await page.locator('#rail a[href="#chain"]').click();
  await page.waitForFunction(() => document.querySelector('#panel-chain .stage-title').textContent === 'Untitled design');
  // Each row's ↑, ↓ and Remove: at least 24 × 24 CSS px, as the page lays them out.
  const sizes = await panel(page).locator('table.chain-blocks button.small').evaluateAll((bs) => bs.map((b) => {
    const r = b.getBoundingClientRect();
    return { name: b.getAttribute('aria-label'), width: r.width, height: r.height };
  }));
  assert.equal(sizes.length, 4 * 3, 'three controls on each of four blocks');
  for (const s of sizes) assert.ok(s.width >= 24 && s.height >= 24, `${s.name}: ${s.width} × ${s.height} px`);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});
