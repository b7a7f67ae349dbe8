// Hostile documents through the page's two ways in — Open (the file picker) and a
// permalink — refused with the reason the native `halfrail check` prints, the field
// named in words (the CLI's key for a script, the page's label for a person), the
// user's design kept untouched, no step added to its history, nothing
// thrown, no network request.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import os from 'os';
import path from 'path';
import { execFileSync } from 'child_process';
import { launch, watch, ready, clearStorage, PAGE_PATH, PAGE_URL, CLI_PATH } from './browser.mjs';

const DEMO = JSON.parse(fs.readFileSync(path.resolve(path.dirname(PAGE_PATH), '..', 'src', 'doc', 'demo.halfrail.json'), 'utf8'));
const withStage = (values) => JSON.stringify({ ...DEMO, stage: { ...DEMO.stage, ...values } });

// [name, text]: each a document the core must refuse.
const HOSTILE = [
  ['wrong type', withStage({ r_fb_ohm: true })],
  ['object for a list', JSON.stringify({ ...DEMO, chain: { ...DEMO.chain, blocks: { kind: 'pad' } } })],
  ['zero', withStage({ r_fb_ohm: 0 })],
  ['negative', withStage({ r_in_ohm: '-220' })],
  ['1e308', JSON.stringify({ ...DEMO, part: { ...DEMO.part, vdd_v: 1e308 } })],
  ['overflow in the prefix', withStage({ r_fb_ohm: '1e308 G' })],
  ['NaN', withStage({ r_fb_ohm: 'NaN' })],
  ['inf', JSON.stringify({ ...DEMO, analysis: { ...DEMO.analysis, f_design_hz: 'inf' } })],
  ['older format', JSON.stringify({ ...DEMO, halfrail: 0 })],
  ['unknown key', JSON.stringify({ ...DEMO, extra: 1 })],
  ['unknown nested key', withStage({ r_feedback: '2k2' })],
  ['huge array', JSON.stringify({ ...DEMO, chain: { ...DEMO.chain, blocks: Array(100000).fill({ kind: 'pad', loss_db: 1 }) } })],
  ['deep nesting', `{"halfrail": 1, "notes": ${'['.repeat(100000)}${']'.repeat(100000)}}`],
  ['50 MB', `{"halfrail": 1, "notes": "${'x'.repeat(50 << 20)}"}`],
];

// What `halfrail check` says of `text`: its one line on stderr, without the prefix.
function refusal(text) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-hostile-'));
  const file = path.join(dir, 'd.json');
  fs.writeFileSync(file, text);
  try {
    execFileSync(CLI_PATH, ['check', file], { stdio: 'pipe' });
    throw new Error('halfrail check accepted it');
  } catch (e) {
    assert.equal(e.status, 2, String(e));
    const lines = e.stderr.toString().trim().split('\n');
    assert.equal(lines.length, 1);
    return lines[0].replace(/^halfrail: /, '');
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

// The CLI's `field: reason` as the page words it for a person: a field of the
// document by its name (`R fb`), the reason the same (its quoted keys in words).
const inWords = (page, line) => {
  const at = line.indexOf(': ');
  return page.evaluate(([field, reason]) => HR.words({ field, reason, message: `${field}: ${reason}` }), [line.slice(0, at), line.slice(at + 2)]);
};

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

async function open(hash) {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.goto(PAGE_URL + hash);
  await ready(page);
  return { page, seen };
}
const draft = (page) => page.evaluate(() => HR.design.text());

test('hostile files through Open are refused as the CLI refuses them, and the design is kept', async () => {
  const { page, seen } = await open('#stage');
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '3k9', 'test'));
  const mine = await draft(page);
  for (const [name, text] of HOSTILE) {
    const reason = await inWords(page, refusal(text));
    const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.locator('#docbar').getByRole('button', { name: 'Open…', exact: true }).click()]);
    // Playwright hands over at most 50 MB from memory: the big one goes as a file on disk.
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-hostile-'));
    const file = path.join(dir, `${name}.json`);
    fs.writeFileSync(file, text);
    await chooser.setFiles(file);
    // One notice at a time: this file's takes the place of the last one's.
    await page.waitForFunction((n) => document.querySelector('.notice')?.textContent.startsWith(`${n}.json was not opened`), name);
    const message = await page.locator('.notice').last().textContent();
    // The 50 MB file is refused before it is read, in the core's wording with the page's count.
    if (name === '50 MB') assert.match(message, /document: is \d+ bytes; at most 4194304 are accepted/);
    else assert.ok(message.includes(reason), `${name}: the page says “${message}”, the CLI “${reason}”`);
    assert.match(message, /Your design is unchanged/);
    fs.rmSync(dir, { recursive: true, force: true });
    assert.equal(await draft(page), mine, name);
    assert.equal(await page.evaluate(() => HR.design.undoLabel()), 'R fb 2k2 → 3k9', `${name}: no step added`);
  }
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
});

test('hostile designs in a permalink are refused the same way, and the saved design is kept', async () => {
  const { page, seen } = await open('#stage');
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '4k7', 'test'));
  const mine = await draft(page);
  // Links made the way the page makes them (deflate-raw, base64url), of the smaller cases.
  const cases = HOSTILE.filter(([name]) => !['huge array', '50 MB', 'deep nesting'].includes(name));
  const links = await page.evaluate(async (texts) => Promise.all(texts.map(async (text) => {
    const bytes = new Uint8Array(await new Response(new Blob([text]).stream().pipeThrough(new CompressionStream('deflate-raw'))).arrayBuffer());
    let s = '';
    for (const b of bytes) s += String.fromCharCode(b);
    return btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
  })), cases.map(([, text]) => text));
  await page.close();
  for (const [i, [name, text]] of cases.entries()) {
    const other = await browser.context.newPage();
    const seen2 = watch(other);
    await other.goto(`${PAGE_URL}#stage&d=${links[i]}`);
    await ready(other);
    const message = await other.locator('.notice').last().textContent();
    const reason = await inWords(other, refusal(text));
    assert.ok(message.includes(reason), `${name}: the page says “${message}”, the CLI “${reason}”`);
    assert.equal(await draft(other), mine, name);
    assert.deepEqual(seen2.requests, []);
    assert.deepEqual(seen2.errors, []);
    await other.close();
  }
  assert.deepEqual(seen.requests, []);
});
