// Words, not keys, from a user's side in Chromium from file://: a bad value is said
// by the field's label (`R fb: must be > 0, got -3300`, not `stage.r_fb_ohm: …`);
// Undo and Redo name the change with the values as engineers write them (`R fb 2k2
// → 3k3`); a warning names a component by its label (`C in`, not `c_in_f`); the
// noise table names each source by its component; the printed sheet has
// no key column, while the CLI, which scripts read, keeps the keys. And Open: one
// notice at a time, a new one in the old one's place, and the header says "Opened …"
// only while a design that was opened is on the page (not after a refused, cancelled
// or undone open).
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import os from 'os';
import path from 'path';
import { execFileSync } from 'child_process';
import { launch, clearStorage, openPanel, undoButton, redoButton, PAGE_PATH, CLI_PATH } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const DEMO_PATH = path.resolve(path.dirname(PAGE_PATH), '..', 'src', 'doc', 'demo.halfrail.json');
const DEMO = JSON.parse(fs.readFileSync(DEMO_PATH, 'utf8'));
// A key of the document as scripts read it: `r_fb_ohm`, `stage.r_fb_ohm`, `part.cgs_f`.
const KEY = /\b[a-z]+_[a-z0-9_]+\b|\b(part|stage|analysis|target|tolerance|bench|chain)\.[a-z]/;

// What `halfrail VERB` says on stderr, refusing the document `doc` (exit status 2).
const refusal = (verb, doc) => {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-words-')), 'design.halfrail.json');
  fs.writeFileSync(file, JSON.stringify(doc));
  try {
    execFileSync(CLI_PATH, [verb, file], { encoding: 'utf8', stdio: 'pipe' });
  } catch (e) {
    assert.equal(e.status, 2);
    return e.stderr.trim();
  } finally {
    fs.rmSync(path.dirname(file), { recursive: true, force: true });
  }
  throw new Error(`halfrail ${verb} did not refuse the document`);
};
const count = (page, id) => page.locator(`#panel-${id}`).getAttribute('data-computed').then(Number);
const recomputed = (page, id, n) => page.waitForFunction(([p, m]) => Number(document.getElementById(`panel-${p}`).dataset.computed) > m, [id, n]);
const value = (page, key) => page.locator(`#panel-stage button.value[data-key="${key}"]`);
// Types `text` into a component of the schematic, in place, as a user does.
async function typeAt(page, key, text) {
  await value(page, key).click();
  await page.locator('#panel-stage input.in-place').fill(text);
  await page.keyboard.press('Enter');
}
const problemOn = async (page, id) => {
  await page.waitForFunction((p) => document.querySelector(`#panel-${p} p.error`)?.textContent !== '', id);
  return page.locator(`#panel-${id} p.error`).textContent();
};
const clean = async (page, seen) => {
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
};

test('a bad value is said by its field’s label on every panel that says it, never by its key', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await typeAt(page, 'r_fb_ohm', '-3300');
  assert.equal(await problemOn(page, 'stage'), 'R fb: must be > 0, got -3300');
  // Another panel says the same, in the same words.
  await page.locator('#rail a[href="#response"]').click();
  const said = await problemOn(page, 'response');
  assert.equal(said, 'R fb: must be > 0, got -3300');
  assert.doesNotMatch(said, KEY);
  // A part's value, on the Part panel's own field and on the Loop panel's line.
  await page.locator('#rail a[href="#part"]').click();
  await typeAtLabel(page, 'part', 'Cgs', '4 uH');
  await page.locator('#rail a[href="#loop"]').click();
  const loop = await problemOn(page, 'loop');
  assert.match(loop, /^(R fb|Cgs): /);
  assert.doesNotMatch(loop, KEY);
  await clean(page, seen);
});

test('a warning of the core names a component by its label, on the Part panel and in the health line', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  // C in taken out (its value emptied in place): the source's DC path moves the bias.
  await typeAt(page, 'c_in_f', '');
  await page.locator('#rail a[href="#part"]').click();
  const warning = page.locator('#panel-part li.warning[data-code="bias-shift"]');
  await warning.waitFor();
  assert.match(await warning.textContent(), /An input coupling capacitor \(C in\) would keep the self-bias\./);
  const finding = page.locator('#health li[data-code="bias-shift"] .text');
  await finding.waitFor();
  assert.equal(await finding.textContent(), await warning.textContent());
  for (const text of [await warning.textContent(), await finding.textContent()]) assert.doesNotMatch(text, KEY);
  await clean(page, seen);
});

async function typeAtLabel(page, id, label, text) {
  await page.locator(`#panel-${id}`).getByLabel(label, { exact: true }).fill(text);
}

test('a refusal that speaks of a field of another section names it by its label; the CLI keeps the keys', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  // A low corner too near the design frequency: Design is refused at the Low corner,
  // and the reason names the design frequency, not `f_design`.
  const corner = page.getByLabel('Low corner', { exact: true });
  await corner.fill('10 MHz');
  await page.getByRole('button', { name: 'Design', exact: true }).click();
  await page.waitForFunction(() => [...document.querySelectorAll('#panel-stage label')]
    .find((l) => l.textContent === 'Low corner').control.getAttribute('aria-invalid') === 'true');
  const reason = await page.locator('#panel-stage .field').filter({ has: corner }).locator('.error').textContent();
  assert.match(reason, /^a low corner of 10\.00 MHz is not well below Design frequency \(10\.70 MHz\).* above Design frequency\/2 \(5\.350 MHz\)/);
  assert.doesNotMatch(reason, KEY, reason);
  // The command, which scripts read, keeps the path and its own words.
  const cli = refusal('design', { ...DEMO, target: { ...DEMO.target, f_low_hz: '10 MHz' } });
  assert.match(cli, /^halfrail: target\.f_low_hz: a low corner of 10\.00 MHz is not well below f_design \(10\.70 MHz\)/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the bench fit’s refusal says the parameters by the names on their boxes; the CLI keeps the key', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  const boxes = page.locator('#panel-part fieldset.choices input[type="checkbox"]');
  // `all()` does not wait: on a panel not yet built it is empty, no box is cleared,
  // and the fit runs with the readings' own choice (seen on loaded fresh clones).
  await boxes.first().waitFor();
  for (const box of await boxes.all()) if (await box.isChecked()) await box.uncheck();
  await page.waitForSelector('#panel-part[data-follow="settled"]', { state: 'attached' });
  await page.getByRole('button', { name: 'Fit the part' }).click();
  const said = page.locator('#panel-part fieldset.choices .error');
  await page.waitForFunction(() => document.querySelector('#panel-part fieldset.choices .error').textContent !== '');
  assert.equal(await said.textContent(), 'no parameter is chosen: choose at least one to fit');
  assert.match(refusal('fit', { ...DEMO, bench: { ...DEMO.bench, fit: [] } }), /^halfrail: bench\.fit: no parameter is chosen/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('Undo and Redo say the change in words, with the values as engineers write them', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  assert.equal(await undoButton(page).getAttribute('title'), 'Nothing to undo');
  let n = await count(page, 'stage');
  // Typed as a plain number, named as it is marked on the part.
  await typeAt(page, 'r_fb_ohm', '3300');
  await recomputed(page, 'stage', n);
  assert.equal(await undoButton(page).getAttribute('title'), 'Undo: R fb 2k2 → 3k3 (Ctrl+Z)');
  n = await count(page, 'stage');
  await undoButton(page).click();
  await recomputed(page, 'stage', n);
  assert.equal(await redoButton(page).getAttribute('title'), 'Redo: R fb 2k2 → 3k3 (Ctrl+Y)');
  assert.equal(await undoButton(page).getAttribute('title'), 'Nothing to undo');
  // A component added, in engineering notation.
  await page.getByRole('button', { name: 'C fb not fitted: add' }).click();
  await page.locator('#panel-stage input.in-place').fill('1p');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#panel-stage button.value[data-key="c_fb_f"]:not(.ghost)');
  assert.equal(await undoButton(page).getAttribute('title'), 'Undo: C fb not fitted → 1.00 pF (Ctrl+Z)');
  // A part's field, typed key by key: one step, from the first value to the last.
  await page.locator('#rail a[href="#part"]').click();
  const supply = page.locator('#panel-part').getByLabel('Supply', { exact: true });
  await supply.fill('');
  await supply.pressSequentially('5');
  await page.waitForFunction(() => HR.design.get('part', 'vdd_v') === '5');
  assert.equal(await undoButton(page).getAttribute('title'), 'Undo: Supply Vdd 3.30 V → 5.00 V (Ctrl+Z)');
  assert.doesNotMatch(await undoButton(page).getAttribute('title'), KEY);
  await clean(page, seen);
});

test('the noise table names each source by its component, and the inverter by its place', async () => {
  const { page, seen } = await openPanel(browser.context, 'response');
  const table = page.locator('#panel-response table').filter({ hasText: 'Who makes the output noise' });
  const sources = await table.locator('tbody tr > :first-child').allTextContents();
  assert.ok(sources.length >= 4, sources.join(', '));
  assert.ok(sources.includes('R fb') && sources.includes('R in') && sources.includes('Inverter 1 (channel noise)'), sources.join(', '));
  const labels = await page.evaluate(() => ['source_ohm', 'shunt_ohm', 'r_in_ohm', 'r_fb_ohm', 'r_out_ohm'].map((k) => HR.field('stage', k).label));
  for (const s of sources) assert.ok(labels.includes(s) || /^Inverter \d+ \(channel noise\)$/.test(s), s);
  await clean(page, seen);
});

test('the printed sheet lists the components without a key column; `halfrail report` keeps the keys', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await page.evaluate(() => { window.printed = 0; window.print = () => { window.printed += 1; }; });
  await page.locator('#docbar').getByRole('button', { name: 'Print sheet', exact: true }).click();
  await page.waitForFunction(() => window.printed === 1, null, { timeout: 20000 });
  const components = page.locator('#sheet table').filter({ hasText: 'R fb' }).first();
  const head = await components.locator('thead th').allTextContents();
  assert.deepEqual(head, ['ref', 'value', 'E-series', 'between']);
  const fb = await components.locator('tbody tr').filter({ hasText: 'R fb' }).locator('td').allTextContents();
  assert.equal(fb[0], 'R fb');
  assert.equal(fb[1], '2k2');
  const cells = await page.locator('#sheet td, #sheet th').allTextContents();
  assert.deepEqual(cells.filter((c) => /^[a-z_]+_(ohm|f)$/.test(c.trim())), [], 'no component key on paper');
  // The schematic is still labelled from the core's table.
  assert.equal(await page.locator('#sheet img').count(), 3);
  // The CLI, which scripts read, keeps its key column.
  const report = execFileSync(CLI_PATH, ['report', DEMO_PATH], { encoding: 'utf8' });
  assert.match(report, /\bkey\b/);
  assert.match(report, /r_fb_ohm/);
  await clean(page, seen);
});

// ---- Open --------------------------------------------------------------------------

const status = (page) => page.locator('#engine-status').textContent();
const file = (name, text) => ({ name, mimeType: 'application/json', buffer: Buffer.from(text) });
async function pick(page, files) {
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.locator('#docbar').getByRole('button', { name: 'Open…', exact: true }).click()]);
  await chooser.setFiles(files);
}
const noticeFor = (page, text) => page.waitForFunction((t) => [...document.querySelectorAll('.notice')].some((n) => n.textContent.startsWith(t)), text);

test('Open: one notice at a time, a new one in the old one’s place, gone once a file opens', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  const notices = page.locator('.notice');
  await pick(page, file('first.halfrail.json', JSON.stringify({ ...DEMO, stage: { ...DEMO.stage, r_fb_ohm: -3300 } })));
  await noticeFor(page, 'first.halfrail.json was not opened');
  assert.equal(await notices.count(), 1);
  assert.match(await notices.textContent(), /R fb: must be > 0, got -3300/);
  await pick(page, file('second.json', 'not JSON'));
  await noticeFor(page, 'second.json was not opened');
  assert.equal(await notices.count(), 1, 'the second notice took the first one’s place');
  await pick(page, file('third.halfrail.json', JSON.stringify({ ...DEMO, halfrail: 2 })));
  await noticeFor(page, 'third.halfrail.json was not opened');
  assert.equal(await notices.count(), 1);
  // A file that opens: the notice of the one before is gone.
  await pick(page, file('good.halfrail.json', JSON.stringify({ ...DEMO, title: 'Good' })));
  await page.waitForFunction(() => HR.design.section('title') === 'Good');
  assert.equal(await notices.count(), 0);
  assert.equal(await status(page), 'Opened good.halfrail.json — Undo brings back your previous design.');
  await clean(page, seen);
});

test('the header says “Opened …” only while a design that was opened is on the page', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  assert.doesNotMatch(await status(page), /Opened/);
  // Refused: nothing opened, nothing said of it in the header.
  await pick(page, file('bad.halfrail.json', JSON.stringify({ ...DEMO, stage: { ...DEMO.stage, r_in_ohm: '-1' } })));
  await noticeFor(page, 'bad.halfrail.json was not opened');
  assert.doesNotMatch(await status(page), /Opened/);
  // Opened: said.
  await pick(page, file('one.halfrail.json', JSON.stringify({ ...DEMO, title: 'One' })));
  await page.waitForFunction(() => HR.design.section('title') === 'One');
  assert.equal(await status(page), 'Opened one.halfrail.json — Undo brings back your previous design.');
  // A refused open after it: the header no longer says the last file was opened.
  await pick(page, file('worse.halfrail.json', '[1]'));
  await noticeFor(page, 'worse.halfrail.json was not opened');
  assert.doesNotMatch(await status(page), /Opened/);
  assert.equal(await page.evaluate(() => HR.design.section('title')), 'One', 'the design opened before is kept');
  // Opened again, then the choice of a file cancelled: nothing opened, nothing said.
  await pick(page, file('two.halfrail.json', JSON.stringify({ ...DEMO, title: 'Two' })));
  await page.waitForFunction(() => HR.design.section('title') === 'Two');
  assert.match(await status(page), /^Opened two\.halfrail\.json/);
  await pick(page, []);
  assert.doesNotMatch(await status(page), /Opened/);
  assert.equal(await page.evaluate(() => HR.design.section('title')), 'Two');
  // Opened, then Undo takes the open back: the header no longer says it was opened.
  await pick(page, file('three.halfrail.json', JSON.stringify({ ...DEMO, title: 'Three' })));
  await page.waitForFunction(() => HR.design.section('title') === 'Three');
  assert.match(await status(page), /^Opened three\.halfrail\.json/);
  await undoButton(page).click();
  await page.waitForFunction(() => HR.design.section('title') === 'Two');
  assert.doesNotMatch(await status(page), /Opened/);
  await clean(page, seen);
});
