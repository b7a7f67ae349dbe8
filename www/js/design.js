'use strict';
// The design the panels share: the document as the user has typed it (the draft,
// which may hold a bad value), and the last draft the core accepted. Both are kept
// in storage, so a reload loses nothing and still has a good design to show.
// Every change can be undone and redone; typing into one field is one step.
// A stored draft the page cannot read at all is kept aside under `recovered`, not
// overwritten; in read-only mode (an embedded view) every change is refused.

HR.design = (() => {
  const KEY = 'design';
  const listeners = new Set();
  const past = [];
  const future = [];
  let lastField = null;
  let draft;
  let good;
  let persist = true;
  let locked = false;
  let recovered = [];
  const HISTORY = 200;

  // Remembers the draft before a change (false: read-only, no change); consecutive
  // edits of one field are one step. A step says what it changes in words: `label`,
  // or for the edit of one field, `edit` ([section, key]; section null for the
  // document's own title and notes), its name and values (`R fb 2k2 → 3k3`), made
  // when asked, as a run of typing changes the value after the step was taken.
  const remember = (label, field, edit = null) => {
    if (locked) return false;
    if (field && field === lastField) return true;
    past.push({ draft: JSON.stringify(draft), label, edit });
    if (past.length > HISTORY) past.shift();
    future.length = 0;
    lastField = field;
    return true;
  };

  // Stored at the end of the task that changed the design, once however many changes it
  // made (an edit writes the draft, and then the panels accept it: one write, not two,
  // and not before the figures), and at once when the page is hidden or closed.
  let saving = false;
  const store = () => {
    saving = false;
    if (persist) HR.store.set(KEY, { draft, good });
  };
  const save = () => {
    if (saving) return;
    saving = true;
    setTimeout(() => saving && store(), 0);
  };
  addEventListener('pagehide', () => saving && store());
  document.addEventListener('visibilitychange', () => document.hidden && saving && store());

  const plain = (v) => v !== null && typeof v === 'object' && !Array.isArray(v);
  // Why a stored value is no draft this page can use (not JSON, not a draft's shape,
  // a document the core cannot read at all, as one of a newer format), or '' when it
  // is one: a bad field value is what drafts hold, and it loads as it is.
  const unusable = (raw) => {
    let saved;
    try { saved = JSON.parse(raw); } catch (e) { return 'it is not JSON'; }
    const d = saved && saved.draft;
    if (!plain(d) || Object.entries(d).some(([k, v]) => !['halfrail', 'title', 'notes'].includes(k) && v !== null && !plain(v))) return 'it is not a design draft';
    const r = HR.call('checkDocument', JSON.stringify(d));
    return r.error && ['halfrail', 'document'].includes(r.error.field) ? HR.words(r.error) : '';
  };

  const load = () => {
    let raw = null;
    try { raw = window.localStorage.getItem(HR.store.prefix + KEY); } catch (e) { /* no storage: the demo */ }
    const why = raw === null ? '' : unusable(raw);
    const kept = HR.store.get('recovered', []);
    recovered = Array.isArray(kept) ? kept : [];
    if (why) {
      recovered.push({ text: raw, why });
      // Without room for the copy, the text stays where it is and nothing is saved over it.
      if (!HR.store.set('recovered', recovered)) persist = false;
    }
    if (raw !== null && !why) {
      const saved = JSON.parse(raw);
      // A draft stored by an older build comes back in the current format.
      const m = HR.call('migrateDocument', JSON.stringify(saved.draft));
      draft = m.error ? saved.draft : JSON.parse(m.ok);
      good = typeof saved.good === 'string' ? saved.good : null;
      const g = good && HR.call('migrateDocument', good);
      if (g) good = g.error ? null : g.ok;
    } else {
      good = HR.demoText();
      draft = JSON.parse(good);
    }
  };

  const notify = (origin) => listeners.forEach((fn) => fn(origin));

  // A step in words (see remember); `ahead`: a step of redo, whose draft is the
  // change's after, where an undo step's is its before.
  const said = (step, ahead) => {
    if (!step.edit) return step.label;
    const [section, key] = step.edit;
    const valueIn = (d) => (section ? (d[section] || {})[key] : d[key]);
    const held = valueIn(JSON.parse(step.draft));
    const [before, after] = ahead ? [valueIn(draft), held] : [held, valueIn(draft)];
    const name = (HR.fieldAt(section ? `${section}.${key}` : key) || { name: key }).name;
    let [b, a] = [HR.valueWords(section, key, before, after), HR.valueWords(section, key, after, before)];
    // Two values that read the same once formatted (10.70 and 10.71 MHz): as typed.
    if (b === a && JSON.stringify(before) !== JSON.stringify(after)) [b, a] = [String(before ?? 'empty'), String(after ?? 'empty')];
    return `${name} ${b} → ${a}`;
  };

  // Writes fields of a section (an empty value removes the field), then tells the views.
  const put = (section, values, origin) => {
    draft[section] = draft[section] || {};
    for (const [key, value] of Object.entries(values)) {
      if (value === '' || value === null || value === undefined) delete draft[section][key];
      else draft[section][key] = value;
    }
    save();
    notify(origin);
  };

  // Moves one step from one history to the other: undo (past → future) or redo.
  const travel = (from, to, origin) => {
    const step = !locked && from.pop();
    if (!step) return;
    to.push({ draft: JSON.stringify(draft), label: step.label, edit: step.edit });
    draft = JSON.parse(step.draft);
    lastField = null;
    save();
    notify(origin);
  };

  return {
    // `persist: false` keeps the design in this page only (an embedded one).
    start({ persist: keep = true } = {}) { persist = keep; load(); },
    // From now on every change is refused (a read-only view).
    lock() { locked = true; },
    readOnly: () => locked,
    // Stored drafts that could not be read, [{text, why}], kept until dismissed.
    recovered: () => recovered,
    dismissRecovered() {
      recovered = [];
      try { window.localStorage.removeItem(`${HR.store.prefix}recovered`); } catch (e) { /* no storage */ }
    },
    // The draft as text, for the core.
    text: () => JSON.stringify(draft),
    // The last text the core accepted, or null.
    lastGood: () => good,
    accept(text) { if (text !== good) { good = text; save(); } },
    get(section, key) { return draft[section] ? draft[section][key] : undefined; },
    section(name) { return draft[name]; },
    // Sets one field as typed; an empty text removes it (not fitted / default).
    set(section, key, value, origin) {
      if (remember('', `${section}.${key}`, [section, key])) put(section, { [key]: value }, origin);
    },
    // Sets a key of the document itself (`title`, `notes`) as typed, as `set` does a
    // section's; an empty text removes it.
    setTop(key, value, origin) {
      if (!remember('', key, [null, key])) return;
      if (value === '' || value === null || value === undefined) delete draft[key];
      else draft[key] = value;
      save();
      notify(origin);
    },
    // Sets several fields of one section as one step: one undo takes them all back.
    setMany(section, values, label, origin) {
      if (remember(label, null)) put(section, values, origin);
    },
    // A field's value in SI base units as the core reads it, or null when empty or bad.
    value(section, key, unit = '') {
      const v = this.get(section, key);
      const r = v === undefined || v === null || v === '' ? {} : HR.call('parseValue', String(v), unit, `${section}.${key}`);
      return r.ok ? r.ok.value : null;
    },
    // Replaces a whole section as one step.
    replace(name, value, label) {
      if (!remember(label, null)) return;
      lastField = null;
      draft[name] = value;
      save();
      notify('replace');
    },
    // Replaces the whole draft with a document's text (checked by the caller) as one step.
    load(text, label) {
      if (!remember(label, null)) return false;
      draft = JSON.parse(text);
      save();
      notify('load');
      return true;
    },
    canUndo: () => past.length > 0,
    canRedo: () => future.length > 0,
    // What Undo and Redo would change, in words: the step's label, or an edit's
    // field and values, before → after (the step holds the draft on its own side).
    undoLabel: () => (past.length ? said(past[past.length - 1], false) : ''),
    redoLabel: () => (future.length ? said(future[future.length - 1], true) : ''),
    undo() { travel(past, future, 'undo'); },
    redo() { travel(future, past, 'redo'); },
    onChange(fn) { listeners.add(fn); },
    // What both ways of following the design share (follow below, for entries fast
    // enough to call after every edit, and HR.background.follow, for long runs):
    // whether the panel is on show and a call each time it is shown again, an error
    // routed to the bound field it names (HR.bind.route) before the panel's
    // `report(error, field)`, the last design the core accepted, to show while nothing
    // is on show, and the count of results rendered (`panel.dataset.computed`).
    watch(panel, report) {
      return {
        shown: () => HR.ui.shown(panel),
        onShown: (fn) => HR.ui.onShown(panel, fn),
        report: (error) => report(error, HR.bind.route(panel, error)),
        fallback: (text, rendered) => (!rendered && good && good !== text ? good : null),
        counted: () => {
          panel.dataset.computed = String(Number(panel.dataset.computed || 0) + 1);
          // The first figures drawn since the page started (the bench's first result).
          if (!performance.getEntriesByName('hr-first-figures').length) performance.mark('hr-first-figures');
        },
      };
    },
    // Keeps a view in step with the design. After each burst of edits (and once now)
    // `compute(text)` runs on the draft: a result is rendered, `render(ok, {text})`, and
    // the draft accepted; an error goes to `report` (null clears it) and the last good
    // design's result is shown instead if nothing was yet. `stale(why, rendered)` marks
    // what is on show as not for the draft ('error'; null when it is). `compute` may
    // answer {pending: why} while part of it computes elsewhere (in the background):
    // the error line is cleared, what is on show is marked stale by `why`, and the caller
    // calls again() when the part arrives. `when()` can hold updates back (while a
    // value is being typed in place). A hidden panel does not compute: an edit made
    // meanwhile is computed when it is shown again. Returns {again()}.
    follow(panel, { compute, render, report, stale, when = () => true }) {
      const seen = this.watch(panel, report);
      let rendered = false;
      const update = () => {
        const text = JSON.stringify(draft);
        const result = compute(text);
        if (result.pending) {
          seen.report(null);
          stale(result.pending, rendered);
          return;
        }
        seen.report(result.error || null);
        if (result.error) {
          const last = seen.fallback(text, rendered);
          const r = last && compute(last);
          if (r && r.ok !== undefined) { render(r.ok, { text: last }); rendered = true; }
          stale('error', rendered);
          return;
        }
        this.accept(text);
        render(result.ok, { text });
        rendered = true;
        stale(null, true);
        seen.counted();
      };
      const schedule = HR.ui.coalesce(update);
      let due = false;
      const again = () => {
        if (seen.shown()) schedule();
        else due = true;
      };
      listeners.add(() => { if (when()) again(); });
      seen.onShown(() => { if (due) { due = false; update(); } });
      update();
      return { again };
    },
  };
})();
