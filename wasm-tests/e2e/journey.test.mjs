// One user's whole journey through the page from file://, in one browser profile:
// the demo on first visit, design to a target and use the best pair, the loop's
// verdict, a spread, a chain built up, save, reload, open the saved file, follow the
// permalink, embed the design in a wiki page's iframe, print the sheet to PDF — and
// not one network request on the way.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import os from 'os';
import path from 'path';
import { launch, watch, ready, clearStorage, PAGE_PATH, PAGE_URL } from './browser.mjs';
import { readPdf, squash } from './pdf.mjs';

let browser;
before(async () => { browser = await launch(); await clearStorage(browser.context); });
after(async () => { await browser.close(); });

const draft = (page) => page.evaluate(() => JSON.parse(HR.design.text()));
const bar = (page, name) => page.locator('#docbar').getByRole('button', { name, exact: true });
const panel = (page, id) => page.locator(`#panel-${id}`);
const show = async (page, id) => {
  await page.locator(`#rail a[data-panel="${id}"]`).click();
  await panel(page, id).waitFor({ state: 'visible' });
};
const computedAfter = (page, id, n) => page.waitForFunction(([i, m]) => Number(document.getElementById(`panel-${i}`)?.dataset.computed || 0) > m, [id, n], { timeout: 60000 });
const computed = (page, id) => page.evaluate((i) => Number(document.getElementById(`panel-${i}`)?.dataset.computed || 0), id);

test('the whole journey, offline', async () => {
  const demo = JSON.parse(fs.readFileSync(path.resolve(path.dirname(PAGE_PATH), '..', 'src', 'doc', 'demo.halfrail.json'), 'utf8'));
  const page = await browser.context.newPage();
  // The clipboard of a file:// page may be refused; this one keeps what is copied.
  await page.addInitScript(() => Object.defineProperty(navigator, 'clipboard', { configurable: true, value: { writeText: async (t) => { window.__copied = t; } } }));
  const seen = watch(page);
  await page.goto(`${PAGE_URL}#stage`);
  await ready(page);
  assert.deepEqual(await draft(page), demo, 'a first visit opens on the demo');

  // Design to a 14 dB target and use the best pair.
  await page.evaluate(() => HR.design.set('target', 'gain_db', '14', 'test'));
  await page.getByRole('button', { name: 'Design', exact: true }).click();
  const best = page.locator('#panel-stage table.candidates tbody tr').first();
  await best.waitFor();
  const wanted = await page.evaluate(() => wasm_bindgen.designReport(HR.design.text()).candidates[0]);
  await best.getByRole('button', { name: /^Use/ }).click();
  await page.waitForFunction((r) => HR.design.value('stage', 'r_fb_ohm', 'Ω') === r, wanted.r_fb_ohm);
  const gain = await page.evaluate(() => wasm_bindgen.responseReport(HR.design.text()).design.gain_db);
  assert.ok(Math.abs(gain - 14) < 0.1, `designed gain ${gain}`);

  // The loop of the designed stage, in words.
  await show(page, 'loop');
  await panel(page, 'loop').locator('.verdict-head').waitFor();
  // The loop computes in a worker once shown: wait for its verdict, not the placeholder.
  await page.waitForFunction(() => { const h = document.querySelector('#panel-loop .verdict-head'); return h && h.textContent !== '—'; });
  assert.match(await panel(page, 'loop').locator('.verdict-head').textContent(), /^(Stable|Rings)/);

  // A spread of it (in the background workers).
  const spreads = await computed(page, 'spread');
  await show(page, 'spread');
  await computedAfter(page, 'spread', spreads);
  assert.match(await panel(page, 'spread').locator('[data-key="yield"]').textContent(), /^Yield \d+\.\d %$/);

  // A chain: one more amplifier at the end.
  await show(page, 'chain');
  await computedAfter(page, 'chain', 0);
  const before = (await draft(page)).chain.blocks.length;
  await panel(page, 'chain').getByRole('button', { name: 'Add an amplifier' }).click();
  await page.waitForFunction((n) => HR.design.section('chain').blocks.length === n + 1, before);
  const design = await draft(page);

  // Save; the file is the design.
  const [download] = await Promise.all([page.waitForEvent('download'), bar(page, 'Save').click()]);
  const saved = fs.readFileSync(await download.path(), 'utf8');
  assert.deepEqual(JSON.parse(saved), design);

  // Reload: the design comes back.
  await page.reload();
  await ready(page);
  assert.deepEqual(await draft(page), design, 'a reload keeps the design');

  // Change it, then open the saved file: the saved design again.
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '1k', 'test'));
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-journey-'));
  const file = path.join(dir, 'stage.halfrail.json');
  fs.writeFileSync(file, saved);
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), bar(page, 'Open…').click()]);
  await chooser.setFiles(file);
  await page.waitForFunction((r) => HR.design.get('stage', 'r_fb_ohm') === r, design.stage.r_fb_ohm);
  assert.deepEqual(await draft(page), design, 'the saved file opens as it was saved');

  // The permalink opens the same design in a fresh page.
  await bar(page, 'Copy link').click();
  await page.waitForFunction(() => window.__copied);
  const link = await page.evaluate(() => window.__copied);
  const other = await browser.context.newPage();
  const seenOther = watch(other);
  await other.goto(link);
  await ready(other);
  assert.deepEqual(await draft(other), design, 'the link holds the whole design');
  await other.close();

  // Embedded in a wiki page: the frame shows the design and reports its height.
  await bar(page, 'Embed…').click();
  const markup = await page.getByRole('dialog', { name: 'Embed this design' }).getByRole('textbox', { name: 'Read only' }).inputValue();
  await page.keyboard.press('Escape');
  fs.copyFileSync(PAGE_PATH, path.join(dir, 'halfrail.html'));
  const wiki = path.join(dir, 'wiki.html');
  fs.writeFileSync(wiki, `<!doctype html><meta charset="utf-8"><title>Lab wiki</title><h1>IF strip</h1>
<script>window.heights = []; addEventListener('message', (e) => { if (e.data && e.data.type === 'halfrail-height') window.heights.push(e.data.height); });</script>
${markup.split(PAGE_URL).join('halfrail.html')}`);
  const host = await browser.context.newPage();
  const frameUrl = `file://${path.join(dir, 'halfrail.html')}`;
  const seenHost = watch(host, [`file://${wiki}`, frameUrl]);
  await host.goto(`file://${wiki}`);
  const frame = host.frameLocator('iframe');
  await frame.locator('html[data-ready="true"]').waitFor({ timeout: 15000 });
  const inner = await (await host.locator('iframe').elementHandle()).contentFrame();
  assert.deepEqual(JSON.parse(await inner.evaluate(() => HR.design.text())), design, 'the frame shows the design');
  await host.waitForFunction(() => window.heights.length > 0 && window.heights.at(-1) > 100);
  await host.close();

  // The printed sheet: the designed values, the gain and the cautions are in the PDF.
  await page.evaluate(() => { window.print = () => { window.printed = true; }; });
  await bar(page, 'Print sheet').click();
  await page.waitForFunction(() => window.printed, null, { timeout: 30000 });
  const pdf = await readPdf(await page.pdf({ format: 'A4' }));
  const expected = await page.evaluate(() => {
    const r = wasm_bindgen.responseReport(HR.design.text()).design;
    return [HR.fmt(r.gain_db, 'dB'), wasm_bindgen.formatRkm(HR.design.value('stage', 'r_fb_ohm', 'Ω'), 'resistor')];
  });
  for (const t of [...expected, 'absolute maximum ratings']) assert.ok(pdf.text.includes(squash(t)), `the PDF has “${t}”`);
  assert.ok(pdf.pages.length <= 2 && pdf.images >= 3, `${pdf.pages.length} pages, ${pdf.images} images`);

  fs.rmSync(dir, { recursive: true, force: true });
  for (const s of [seen, seenOther, seenHost]) {
    assert.deepEqual(s.requests, [], 'no network request');
    assert.deepEqual(s.errors, []);
  }
});
