// What a user typed is shown as text, never as markup: a design whose title, notes,
// block names and a bad value hold HTML goes through every panel and the printed
// sheet; the HTML shows as its characters, no element is made from it, nothing runs
// and nothing is fetched. The page's own scripts never write HTML from strings.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import path from 'path';
import { launch, watch, ready, clearStorage, PAGE_PATH, PAGE_URL } from './browser.mjs';

const here = path.dirname(PAGE_PATH);
const DEMO = JSON.parse(fs.readFileSync(path.resolve(here, '..', 'src', 'doc', 'demo.halfrail.json'), 'utf8'));
const PANELS = ['brief', 'part', 'stage', 'response', 'loop', 'swing', 'spread', 'chain', 'crystal', 'bench'];
const MARKUP = '<img src=x onerror="window.pwned=(window.pwned||0)+1"><b id=bold>b</b>';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

// What the page made of the markup: elements it would have created, and whether it ran.
const traces = (page) => page.evaluate(() => ({
  ran: window.pwned || 0,
  images: [...document.querySelectorAll('img')].filter((i) => i.getAttribute('src') === 'x').length,
  handlers: document.querySelectorAll('[onerror]').length,
  bold: document.querySelectorAll('#bold').length,
}));
const CLEAN = { ran: 0, images: 0, handlers: 0, bold: 0 };

test('markup in the title, notes, block names and a typed value is shown as text in every panel and on the sheet', async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.goto(`${PAGE_URL}#part`);
  await ready(page);
  const blocks = DEMO.chain.blocks.map((b, i) => (i === 0 ? { ...b, name: `Filter ${MARKUP}` } : b));
  blocks.push({ kind: 'amp', name: MARKUP, gain_db: 10, nf_db: 3 });
  const doc = { ...DEMO, title: `IF strip ${MARKUP}`, notes: `# Heading ${MARKUP}\n\n*${MARKUP}*`, chain: { ...DEMO.chain, blocks } };
  await page.evaluate((text) => HR.design.load(text, 'markup'), JSON.stringify(doc));
  for (const id of PANELS) {
    await page.locator(`#rail a[data-panel="${id}"]`).click();
    await page.locator(`#panel-${id}`).waitFor();
    // Panels that compute mark themselves when their figures are in.
    await page.waitForSelector(`#panel-${id}[data-computed]`, { timeout: 15000 }).catch(() => {});
    assert.deepEqual(await traces(page), CLEAN, id);
  }
  const chainText = await page.locator('#panel-chain').innerText();
  assert.ok(chainText.includes('<img src=x') || (await page.locator('#panel-chain input').evaluateAll(
    (inputs, m) => inputs.some((i) => i.value === m), MARKUP)), 'the block name is shown as typed');

  // A bad value quoting the markup: its message is text beside the field.
  await page.locator('#rail a[data-panel="stage"]').click();
  await page.evaluate((m) => HR.design.set('stage', 'r_fb_ohm', m, 'test'), MARKUP);
  await page.waitForFunction(() => document.getElementById('panel-stage').innerText.includes('<img src=x'), null, { timeout: 10000 });
  assert.deepEqual(await traces(page), CLEAN, 'a bad value');
  await page.evaluate(() => HR.design.undo());

  // The printed sheet carries the title and the notes.
  await page.evaluate(() => { window.printed = 0; window.print = () => { window.printed += 1; }; });
  await page.locator('#docbar').getByRole('button', { name: 'Print sheet', exact: true }).click();
  await page.waitForFunction(() => window.printed === 1, null, { timeout: 30000 });
  const sheet = await page.locator('#sheet').innerText();
  assert.ok(sheet.includes(`IF strip ${MARKUP}`), 'the title prints as typed');
  assert.ok(sheet.includes(`Heading ${MARKUP}`), 'the notes print as typed');
  assert.deepEqual(await traces(page), CLEAN, 'the sheet');
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the page\'s scripts write no HTML from strings', () => {
  const root = path.resolve(here, '..', 'www', 'js');
  const files = fs.readdirSync(root, { recursive: true }).filter((f) => f.endsWith('.js'));
  assert.ok(files.length > 10, 'the scripts are found');
  for (const f of files) {
    const text = fs.readFileSync(path.join(root, f), 'utf8');
    for (const sink of [/\.innerHTML\s*[+]?=/, /\.outerHTML\s*[+]?=/, /insertAdjacentHTML/, /document\.write/, /DOMParser/, /createContextualFragment/]) {
      assert.doesNotMatch(text, sink, `${f} uses ${sink}`);
    }
  }
});
