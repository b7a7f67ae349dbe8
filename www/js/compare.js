'use strict';
// Compare: a design pinned as the reference, drawn under every plot and set beside
// every key figure. The reference is a draft the core accepts, kept as text in
// storage (`reference`), apart from the design: not in files or links, not undone.
// Its figures come from the same core entries on its text (memoised here); the page
// only subtracts numbers it shows. An embedded frame neither shows nor pins one.

HR.compare = (() => {
  const { el } = HR.ui;
  const { known, fixed } = HR;
  const listeners = new Set();
  const memo = new Map();
  let ref = null; // {text, label}
  let off = false;
  let badge = null;
  let clear = null;

  const text = () => (off || !ref ? null : ref.text);
  const label = () => (ref ? ref.label : '');
  const changed = () => {
    memo.clear();
    if (badge) {
      badge.hidden = clear.hidden = !text();
      badge.textContent = `Reference: ${label()}`;
      badge.title = label();
    }
    listeners.forEach((fn) => fn());
  };
  // The reference kept in storage, when it is one.
  const stored = () => {
    const kept = HR.store.get('reference', null);
    return kept && typeof kept.text === 'string' ? kept : null;
  };
  const keep = (value) => { ref = value; HR.store.set('reference', value); changed(); };

  // Pins the draft, when the core accepts it; says why not otherwise.
  const pin = () => {
    const t = HR.design.text();
    const r = HR.check(t);
    if (r.error) {
      HR.setStatus(`Not pinned as the reference: ${HR.words(r.error)}. Fix it first.`, true);
      return false;
    }
    const title = String(JSON.parse(t).title || '').trim();
    keep({ text: t, label: title || `reference ${new Date().toLocaleTimeString()}` });
    HR.setStatus(`Pinned “${label()}” as the reference: plots and figures now show it too.`);
    return true;
  };

  // The reference's result of a small-signal core entry (its text first, then `args`),
  // or null without a reference, when the core refuses it, or while it computes: the
  // first ask runs it in a worker (lane `reference-<entry>`: a reference can be a
  // design that takes long, and the page must not wait on it) and every render is run
  // again when it arrives.
  const report = (entry, ...args) => {
    const t = text();
    if (!t) return null;
    const key = JSON.stringify([entry, args]);
    if (!memo.has(key)) {
      const pending = { pending: true };
      pending.promise = HR.background.run(entry, [t, ...args], { lane: `reference-${entry}` }).promise.then((r) => {
        if (text() !== t || memo.get(key) !== pending) return;
        memo.set(key, r.cancelled ? {} : r);
        listeners.forEach((fn) => fn());
      });
      memo.set(key, pending);
    }
    const r = memo.get(key);
    return r.ok === undefined ? null : r.ok;
  };

  // A background run (`handle`, as HR.background.run returns) whose promise also waits
  // for the reference's results of `entries` ([[entry, ...args], …]), so that the
  // panel's render finds them: what a panel's follow job returns.
  const along = (handle, entries) => ({
    cancel: handle.cancel,
    end: handle.end,
    promise: Promise.all([handle.promise, ...entries.map(([entry, ...args]) => {
      if (!text()) return null;
      report(entry, ...args);
      const m = memo.get(JSON.stringify([entry, args]));
      return m && m.promise;
    })]).then(([r]) => r),
  });

  // `render` run again on what it last drew whenever the reference changes.
  const rerender = (render) => {
    let last = null;
    const wrapped = (...args) => { last = args; render(...args); };
    wrapped.again = () => last && render(...last);
    listeners.add(wrapped.again);
    return wrapped;
  };

  // This design's figure less the reference's, as text: `how` is 'dB', '°', 'K', 'ppm',
  // a unit for HR.fmt ('Ω', 'A', 'W', '%'), '' (a plain number), or '×' for frequencies,
  // times and noise, given as the ratio this ÷ reference.
  const delta = (a, b, how) => {
    if (!known(a) || !known(b)) return '—';
    if (how === '×') return `×${fixed(a / b, 3)}`;
    const d = a - b;
    const t = how === '°' ? `${fixed(d, 1)}°` : how === 'K' ? `${fixed(d, 0)} K` : how === 'ppm' ? `${fixed(d, 2)} ppm` : how ? HR.fmt(d, how, 3) : fixed(d, 3);
    return d > 0 && /[1-9]/.test(t) ? `+${t}` : t;
  };
  const NOTE = 'Under each figure: the reference’s value, and Δ, this design less the reference (× : frequencies, times and noise as this design’s over the reference’s).';

  // Under each figure cell of `cells` ({key: element}), "ref <its text> · Δ <difference>"
  // while a reference is pinned: `texts(report)` gives the figures' texts, `diffs[key](report)`
  // the [value, how] pairs compared. Cleared without a reference.
  const figures = (cells, texts, diffs, now, reference) => {
    const shown = reference ? texts(reference) : {};
    for (const [k, cell] of Object.entries(cells)) {
      const old = cell.querySelector('.vs');
      if (old) old.remove();
      if (!reference) continue;
      const theirs = diffs[k] ? diffs[k](reference) : [];
      const parts = diffs[k] ? diffs[k](now).map(([v, how], i) => delta(v, theirs[i][0], how)) : [];
      cell.append(el('span', { class: 'vs' }, `ref ${shown[k]}${parts.some((t) => t !== '—') ? ` · Δ ${parts.join(', ')}` : ''}`));
    }
    const dl = Object.values(cells)[0].closest('dl');
    let note = dl && dl.nextElementSibling;
    if (dl && !(note && note.classList.contains('vs-note'))) dl.after(note = el('p', { class: 'plot-note vs-note' }, NOTE));
    if (note) note.hidden = !reference;
  };

  // The reference's result of a long background entry (Swing, Spread): never started
  // by itself. A result the panel computed for the reference's very text is taken
  // (`offer(text, result)` on each render); else a button runs it in a lane of its own.
  // `node` is the line saying which; `onResult()` runs when a result comes.
  const slow = (entry, onResult) => {
    let got = null;
    let offered = null;
    let job = null;
    const say = el('span');
    const go = el('button', { type: 'button', class: 'small', onclick: () => run() }, 'Compute the reference too');
    const node = el('p', { class: 'vs-line', hidden: true }, say, ' ', go);
    const result = () => {
      const t = text();
      return [got, offered].find((g) => g && t && g.text === t && g.ok) || null;
    };
    const sync = () => {
      const t = text();
      const has = result();
      node.hidden = !t;
      go.hidden = Boolean(has || job);
      if (!job) say.textContent = has ? `Reference “${label()}” shown beside the figures.` : got && got.text === t && got.error ? `The reference could not be computed (${HR.reasonWords(got.error)}).` : 'Reference not computed here.';
    };
    const run = () => {
      const t = text();
      const mine = { text: t, handle: HR.background.run(entry, [t], { lane: `reference-${entry}`,
        onProgress: (p) => { say.textContent = `Computing the reference in the background… ${fixed(100 * p, 0)} %`; } }) };
      job = mine;
      say.textContent = 'Computing the reference in the background…';
      sync();
      mine.handle.promise.then((r) => {
        if (job !== mine) return;
        job = null;
        if (!r.cancelled) got = { text: t, ok: r.ok, error: r.error };
        sync();
        onResult();
      });
    };
    listeners.add(() => {
      if (job && job.text !== text()) { job.handle.cancel(); job = null; }
      sync();
    });
    sync();
    return {
      node,
      result: () => { const g = result(); return g ? g.ok : null; },
      offer(t, ok) { offered = { text: t, ok }; sync(); },
    };
  };

  // The Design bar's controls and badge (`embed`: none, and no reference shown).
  const controls = (embed) => {
    off = embed;
    if (embed) return [];
    ref = stored();
    badge = el('span', { class: 'ref-badge', role: 'status' });
    clear = el('button', { type: 'button', onclick: () => { keep(null); HR.setStatus('Reference cleared.'); } }, 'Clear reference');
    // Another tab of this page pinned or cleared the reference: show what it stored.
    window.addEventListener('storage', (e) => {
      if (e.key !== `${HR.store.prefix}reference`) return;
      ref = stored();
      changed();
    });
    changed();
    return [el('button', { type: 'button', onclick: pin }, 'Pin as reference'), clear, badge];
  };

  return { text, label, pin, clear: () => keep(null), onChange: (fn) => listeners.add(fn), report, along, rerender, figures, slow, controls };
})();
