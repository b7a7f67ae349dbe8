// The Brief panel in Chromium from file://, from a user's side: a design frequency
// typed there moves the Stage and Response figures to what `halfrail analyze` gives
// for the same document; a bad value is said beside its field, the last good figures
// stay, and Undo (the button or Ctrl+Z) restores it; the title typed heads the page
// and names the saved files (today's names without one); notes survive a reload; the
// input level is one value with the Swing panel's field; and the design-to-target
// message's "lower f_design" takes the user to the field that does it.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, ready, cli, undoButton, redoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const brief = (page) => page.locator('#panel-brief');
const field = (page, label) => brief(page).getByLabel(label, { exact: true });
// The error shown beside a field (its aria-describedby names it first).
const errorOf = (page, label) => field(page, label).evaluate((input) => document.getElementById(input.getAttribute('aria-describedby').split(' ')[0]).textContent);
const figure = (page, id, key) => page.locator(`#panel-${id} dd[data-key="${key}"]`).textContent();
const count = (page, id) => page.locator(`#panel-${id}`).getAttribute('data-computed').then(Number);
const recomputed = (page, id, n) => page.waitForFunction(([p, m]) => Number(document.getElementById(`panel-${p}`).dataset.computed) > m, [id, n]);
const text = (page) => page.evaluate(() => HR.design.text());
// Shows panel `id` from the rail and waits for figures of the design as it is now.
const visit = async (page, id) => {
  await page.locator(`#rail a[href="#${id}"]`).click();
  await page.waitForFunction((p) => {
    const panel = document.getElementById(`panel-${p}`);
    return panel && !panel.hidden && panel.dataset.computed && panel.querySelector('.stale-note').hidden;
  }, id);
};
const saved = async (page, click) => {
  const download = page.waitForEvent('download');
  await click();
  return (await download).suggestedFilename();
};

test('a design frequency typed in Brief moves the Stage and Response figures to what halfrail analyze gives', async () => {
  const { page, seen } = await openPanel(browser.context, 'brief');
  const demo = cli('analyze', await text(page)).ac;
  assert.ok((await figure(page, 'brief', 'gain')).startsWith(`${demo.gain_db.toFixed(2)} dB at 10.70 MHz`));
  const n = await count(page, 'brief');
  await field(page, 'Design frequency').fill('40 MHz');
  await recomputed(page, 'brief', n);
  assert.equal(await page.evaluate(() => HR.design.get('analysis', 'f_design_hz')), '40 MHz');
  const ac = cli('analyze', await text(page)).ac;
  assert.notEqual(ac.gain_db.toFixed(2), demo.gain_db.toFixed(2), 'the gain is another at 40 MHz');
  assert.equal(await figure(page, 'brief', 'gain'), `${ac.gain_db.toFixed(2)} dB at 40.00 MHz`);
  assert.equal(await figure(page, 'brief', 'sparams'), `${ac.s11_db.toFixed(2)} dB, ${ac.s21_db.toFixed(2)} dB`);
  await visit(page, 'response');
  assert.ok((await figure(page, 'response', 'gain')).startsWith(`${ac.gain_db.toFixed(2)} dB (`), await figure(page, 'response', 'gain'));
  assert.equal(await figure(page, 'response', 'nf'), `${ac.nf_db.toFixed(2)} dB`);
  await visit(page, 'stage');
  assert.ok((await figure(page, 'stage', 'gain')).startsWith(`${ac.gain_db.toFixed(2)} dB`), await figure(page, 'stage', 'gain'));
  assert.equal(await figure(page, 'stage', 'nf'), `${ac.nf_db.toFixed(2)} dB`);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a bad value is said beside its field in words, the last good design stays, and Undo restores it', async () => {
  const { page, seen } = await openPanel(browser.context, 'brief');
  const gain = await figure(page, 'brief', 'gain');
  const good = await page.evaluate(() => HR.design.lastGood());
  const f = field(page, 'Design frequency');
  await f.fill('2 GHz');
  await page.waitForFunction(() => document.getElementById('brief-f-design-hz').getAttribute('aria-invalid') === 'true');
  const said = await errorOf(page, 'Design frequency');
  assert.match(said, /must be ≤/, said);
  assert.doesNotMatch(said, /analysis\.|f_design_hz/, 'beside the field, the reason alone');
  assert.equal(await brief(page).locator('p.error').isVisible(), false, 'said once, at the field');
  assert.equal(await brief(page).locator('.stale-note').isVisible(), true);
  assert.equal(await figure(page, 'brief', 'gain'), gain, 'the last good figures stay');
  assert.equal(await page.evaluate(() => HR.design.lastGood()), good, 'the last good design is kept');
  // Another panel shows the last good design's figures too, marked stale.
  await page.locator('#rail a[href="#response"]').click();
  await page.waitForFunction(() => document.querySelector('#panel-response .stale-note')?.hidden === false);
  assert.ok((await figure(page, 'response', 'gain')).startsWith(gain.split(' at ')[0]));
  // Ctrl+Z, with the focus out of the field, takes the whole edit back in one step.
  await page.locator('#rail a[href="#brief"]').click();
  await page.locator('body').click({ position: { x: 5, y: 5 } });
  await page.keyboard.press('Control+z');
  await page.waitForFunction(() => document.getElementById('brief-f-design-hz').getAttribute('aria-invalid') === 'false');
  assert.equal(await f.inputValue(), '10.7 MHz');
  assert.equal(await errorOf(page, 'Design frequency'), '');
  assert.equal(await undoButton(page).isDisabled(), true, 'one step, all taken back');
  // Redo brings the bad value back; a word that is no number is said so too.
  await redoButton(page).click();
  await page.waitForFunction(() => document.getElementById('brief-f-design-hz').value === '2 GHz');
  await undoButton(page).click();
  await field(page, 'Points per decade').fill('many');
  await page.waitForFunction(() => document.getElementById('brief-points-per-decade').getAttribute('aria-invalid') === 'true');
  assert.match(await errorOf(page, 'Points per decade'), /many/);
  // A noise band upside down is said at its upper end.
  await undoButton(page).click();
  await field(page, 'Noise band up to').fill('1 MHz');
  await page.waitForFunction(() => document.getElementById('brief-noise-f-high-hz').getAttribute('aria-invalid') === 'true');
  assert.match(await errorOf(page, 'Noise band up to'), /must be >/);
  await undoButton(page).click();
  await page.waitForFunction(() => document.getElementById('brief-noise-f-high-hz').getAttribute('aria-invalid') === 'false');
  // A bad value no field here holds (the part's supply, typed on the Part panel) is said
  // above the figures, which stay the last good design's.
  await page.locator('#rail a[href="#part"]').click();
  await page.locator('#panel-part').getByLabel('Supply', { exact: true }).fill('-3');
  await page.locator('#rail a[href="#brief"]').click();
  await page.waitForFunction(() => document.querySelector('#panel-brief p.error').textContent !== '');
  assert.equal(await brief(page).locator('p.error').isVisible(), true);
  assert.match(await brief(page).locator('p.error').textContent(), /must be > 0/);
  assert.equal(await figure(page, 'brief', 'gain'), gain);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the title typed heads the page and names the saved files; without one, the usual names', async () => {
  const { page, seen } = await openPanel(browser.context, 'brief');
  const header = page.locator('#design-title');
  assert.equal(await header.textContent(), 'Demo: 10.7 MHz IF gain block for a small lab receiver');
  const title = field(page, 'Title');
  await title.selectText();
  await title.pressSequentially('Front end 21.4 MHz / rev B');
  await page.waitForFunction(() => document.getElementById('design-title').textContent === 'Front end 21.4 MHz / rev B');
  const stem = 'Front-end-21.4-MHz-rev-B';
  assert.equal(await saved(page, () => page.locator('#docbar').getByRole('button', { name: 'Save' }).click()), `${stem}.halfrail.json`);
  await visit(page, 'response');
  assert.equal(await saved(page, () => page.getByRole('button', { name: 'Save the sweep as CSV' }).click()), `${stem}-sweep.csv`);
  assert.equal(await saved(page, () => page.getByRole('button', { name: 'Save “Voltage gain” as PNG' }).click()), `${stem}-gain.png`);
  // The printed sheet is headed by the title and saved (as PDF) under it.
  const printing = await page.evaluate(() => {
    dispatchEvent(new Event('beforeprint'));
    const seen = { title: document.title, head: document.querySelector('#sheet h1').textContent };
    dispatchEvent(new Event('afterprint'));
    return { ...seen, after: document.title };
  });
  assert.deepEqual(printing, { title: `${stem}-sheet`, head: 'Front end 21.4 MHz / rev B', after: 'Response — Halfrail' });
  // The typing was one step: one Undo brings the demo's title back.
  await page.locator('#rail a[href="#brief"]').click();
  await undoButton(page).click();
  await page.waitForFunction(() => document.getElementById('design-title').textContent.startsWith('Demo: 10.7 MHz'));
  // No title: the header says so, and the files take the names they always had.
  await title.fill('');
  await page.waitForFunction(() => document.getElementById('design-title').textContent === 'Untitled design');
  assert.equal(await page.evaluate(() => 'title' in JSON.parse(HR.design.text())), false, 'an empty title is no title');
  assert.equal(await saved(page, () => page.locator('#docbar').getByRole('button', { name: 'Save' }).click()), 'design.halfrail.json');
  await visit(page, 'response');
  assert.equal(await saved(page, () => page.getByRole('button', { name: 'Save the sweep as CSV' }).click()), 'halfrail-sweep.csv');
  assert.equal(await saved(page, () => page.getByRole('button', { name: 'Save “Voltage gain” as PNG' }).click()), 'halfrail-gain.png');
  // A title over the core's limit is refused beside the field.
  await page.locator('#rail a[href="#brief"]').click();
  await title.fill('x'.repeat(201));
  await page.waitForFunction(() => document.getElementById('brief-title').getAttribute('aria-invalid') === 'true');
  assert.match(await errorOf(page, 'Title'), /200 characters/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('notes and title survive a reload, and are printed on the sheet', async () => {
  const { page, seen } = await openPanel(browser.context, 'brief');
  const notes = 'Bias checked at 3.3 V.\n\nNext: try the 5 V part — and <b>not</b> markup.';
  await field(page, 'Notes').fill(notes);
  await field(page, 'Title').fill('Receiver IF, board 2');
  await page.reload();
  await ready(page);
  await page.waitForSelector('#panel-brief[data-computed]');
  assert.equal(await field(page, 'Notes').inputValue(), notes);
  assert.equal(await field(page, 'Title').inputValue(), 'Receiver IF, board 2');
  assert.equal(await page.locator('#design-title').textContent(), 'Receiver IF, board 2');
  await page.waitForFunction(() => HR.sheet.ready()); // the sheet is prepared in the background
  const sheet = await page.evaluate(() => {
    dispatchEvent(new Event('beforeprint'));
    const s = document.getElementById('sheet').innerText;
    dispatchEvent(new Event('afterprint'));
    return s;
  });
  assert.ok(sheet.includes('Next: try the 5 V part — and <b>not</b> markup.'), 'the notes, as text');
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the input level is one value with the Swing panel’s field', async () => {
  const { page } = await openPanel(browser.context, 'brief');
  await field(page, 'Input level').fill('-35');
  await page.locator('#rail a[href="#swing"]').click();
  const swing = page.locator('#panel-swing').getByLabel('Input level (dBm available from the source)', { exact: true });
  assert.equal(await swing.inputValue(), '-35');
  await swing.fill('-38 dBm');
  await page.locator('#rail a[href="#brief"]').click();
  assert.equal(await field(page, 'Input level').inputValue(), '-38 dBm');
  await page.close();
});

test('“lower f_design” in the design-to-target message takes the user to the design frequency', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  const designed = (n) => page.waitForFunction((m) => Number(document.getElementById('panel-stage').dataset.designed || 0) > m, n);
  const designs = () => page.locator('#panel-stage').getAttribute('data-designed').then((v) => Number(v) || 0);
  await page.locator('#panel-stage').getByLabel('Gain wanted').fill('17');
  let n = await designs();
  await page.locator('#panel-stage').getByRole('button', { name: 'Design', exact: true }).click();
  await designed(n);
  const warning = page.locator('#panel-stage .design-out .warning');
  assert.match(await warning.textContent(), /cannot reach 17\.00 dB.*or lower f_design, or take a faster part\.$/);
  await warning.getByRole('link', { name: 'lower f_design' }).click();
  await page.waitForFunction(() => document.activeElement && document.activeElement.id === 'brief-f-design-hz');
  assert.equal(await page.evaluate(() => location.hash), '#brief');
  assert.equal(await brief(page).isVisible(), true);
  n = await designs();
  await page.keyboard.press('Control+a');
  await page.keyboard.insertText('1 MHz');
  // Back to the Stage: the design follows, and at 1 MHz the part reaches the target.
  await page.goBack();
  await designed(n);
  await page.waitForFunction(() => !document.querySelector('#panel-stage .design-out').classList.contains('stale'));
  const d = cli('design', await text(page));
  assert.equal(d.feasible, true);
  assert.equal(await warning.isVisible(), false);
  assert.equal(await page.locator('#panel-stage table.candidates tbody tr').count(), d.candidates.length);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the Brief’s layout stays inside 800 px', async () => {
  const { page } = await openPanel(browser.context, 'brief');
  await page.setViewportSize({ width: 800, height: 900 });
  const over = await page.evaluate(() => [...document.querySelectorAll('#panel-brief input, #panel-brief textarea')]
    .filter((n) => n.getBoundingClientRect().right > document.documentElement.clientWidth).map((n) => n.id));
  assert.deepEqual(over, []);
  await page.close();
});
