'use strict';
// The design's health: one line above every panel, from the core's `health` report
// (an oscillation, ringing, the part setting the gain, the bias warnings), each
// finding in the core's words with a link to the panel that explains it. It follows
// the design like a panel, in a worker of its own (a nine-inverter design's loop
// analysis can take a second), and is always on show, so it is computed once per
// change; the worker is kept across edits (the call is usually over within a frame).
// When the core says the figures are
// void (the stage oscillates), the small-signal read-outs that panels hand to `voids`
// are struck through under a note pointing here. The page writes nothing of its own
// about the design: only the core's text, and the words for no finding.

HR.health = (() => {
  const { el } = HR.ui;
  // The panel that explains each topic of the core's findings.
  const PANEL = { bias: 'part', loop: 'loop', gain: 'stage' };
  const SEVERITY = { void: 'Figures void', caution: 'Caution' };
  const readouts = []; // [{readout, keys, note}] handed over by the panels
  let line = null;
  let report = null; // the last report on show: {void, findings}
  let shown = null; // its text: an unchanged report leaves the DOM (and a focused link) alone

  const link = (topic) => {
    const id = PANEL[topic];
    const panel = id && HR.panels.find((p) => p.id === id);
    return panel ? el('a', { href: `#${id}${HR.documents.tail}`, 'data-panel': id }, `${panel.title} panel`) : null;
  };

  const mark = (r) => {
    const gone = Boolean(r && r.void);
    for (const { readout, keys, note } of readouts) {
      note.hidden = !gone;
      for (const dd of readout.querySelectorAll('dd[data-key]')) {
        if (gone && keys.includes(dd.dataset.key)) dd.dataset.void = 'true';
        else delete dd.dataset.void;
      }
    }
  };

  const render = (r) => {
    report = r;
    const text = JSON.stringify(r);
    if (text === shown) return;
    shown = text;
    line.dataset.state = r.void ? 'void' : r.findings.length ? 'caution' : 'clear';
    const head = el('span', { class: 'health-head' }, 'Health');
    line.replaceChildren(head, r.findings.length
      ? el('ul', {}, r.findings.map((f) => el('li', { 'data-code': f.code, 'data-severity': f.severity, 'data-topic': f.topic },
        el('span', { class: 'severity' }, SEVERITY[f.severity] || f.severity), ' ',
        el('span', { class: 'text' }, HR.textWords(f.text)), ' ', link(f.topic))))
      : el('p', { class: 'quiet' }, 'No findings.'));
    line.classList.remove('empty');
    mark(r);
  };

  return {
    // Puts the line at the top of the panels' area and starts following the design
    // (after HR.documents.start, before the first panel mounts).
    start() {
      // Empty (not `hidden`, which would stop it following) until a design gives a report.
      line = el('section', { class: 'health empty', id: 'health', 'aria-label': 'Health of the design' });
      document.getElementById('main').prepend(line);
      HR.background.follow(line, {
        name: 'health',
        args: (text) => [text],
        keep: true,
        // Posted in a task of its own after the edit, not within it: the panel on show
        // computes its figures first (Stage's, on the main thread, wait for nothing).
        delay: 1,
        quiet: HR.background.QUIET,
        progress: () => {},
        render,
        // The panels say what is wrong with the draft; the line keeps the last design's.
        report: () => {},
        stale: (why) => { line.classList.toggle('stale', Boolean(why)); },
      });
    },
    // The last report on show, or null.
    current: () => report,
    // Marks the read-outs of `readout` (a <dl> whose <dd>s carry data-key) named in
    // `keys` as void while the core says the figures are; returns the note saying so,
    // for the panel to put above them.
    voids(readout, keys) {
      const note = el('p', { class: 'void-note', hidden: true },
        'Void: these small-signal figures do not describe this stage — the health line at the top says why.');
      readouts.push({ readout, keys, note });
      mark(report);
      return note;
    },
  };
})();
