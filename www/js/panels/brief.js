'use strict';
// Brief: what the design is called and where it is analysed — the document's title
// and notes, the design frequency, the sweep, z0, the noise band and the input level
// — each a field bound to the design (HR.bind), so the core's errors show beside it
// and every edit is a step of undo. Beside them, what those settings give, from the
// core's response at the design frequency.

(() => {
  const { el, card } = HR.ui;

  // The fields: [key of `analysis`, label, hint]. The words are those of the core's
  // catalogue of document fields (src/doc/fields.rs); once the page can ask the core
  // for them, they come from there by path.
  // Laid out in pairs: each row two that belong together.
  const FREQUENCIES = [
    ['f_design_hz', 'Design frequency', 'Hz, e.g. 10.7 MHz'],
    ['points_per_decade', 'Points per decade', 'default 50'],
    ['f_start_hz', 'Sweep from', 'Hz, default 10 Hz'],
    ['f_stop_hz', 'Sweep up to', 'Hz, default 1 GHz'],
  ];
  const PORTS = [
    ['z0_ohm', 'Reference impedance z0', 'Ω, default 50'],
    // The Swing panel names its field of the same key in full.
    ['input_dbm', 'Input level', 'dBm available from the source: one tone at f_design, e.g. −40 dBm; empty for −30 dBm'],
    ['noise_f_low_hz', 'Noise band from', 'Hz, with the band’s upper end; both empty: no band'],
    ['noise_f_high_hz', 'Noise band up to', 'Hz, with the band’s lower end'],
  ];
  // Field ids, so a message elsewhere can send the user to one (HR.goTo).
  const idOf = (key) => `brief-${key.replace(/_/g, '-')}`;

  const FIGURES = [
    ['gain', 'Gain at the design frequency'], ['sparams', 'Two-port at z0 (S11, S21)'], ['band_noise', 'Output noise in the noise band'],
    ['sweep', 'Swept from … to'], ['points', 'Frequencies swept'],
  ];

  HR.panel({
    id: 'brief',
    title: 'Brief',
    mount(container) {
      const analysis = (list) => list.map(([key, label, hint]) => HR.bind('analysis', key, { label, hint, id: idOf(key), compact: true, origin: 'brief' }).wrap);
      // The document's own keys, beside its sections.
      const top = (key, opts) => HR.bind.widget(key, {
        id: idOf(key), ...opts,
        value: () => HR.design.section(key),
        commit: (v) => HR.design.setTop(key, v, 'brief'),
      });
      const title = top('title', { label: 'Title', hint: 'Names the saved files and heads the printed sheet; up to 200 characters' });
      title.wrap.classList.add('brief-title');
      // Notes are kept as typed, blank lines and all; only an empty box removes them.
      const notes = top('notes', { label: 'Notes', hint: 'Anything worth keeping with the design: printed on the sheet', rows: 5, read: (t) => t });
      notes.wrap.classList.add('brief-notes');

      const named = card('Name and notes', title.wrap, notes.wrap);
      named.classList.add('wide');
      const where = card('Frequencies',
        el('p', { class: 'intro' }, 'Where the stage is designed and judged, and the range every plot and figure is swept over (the design frequency must lie within it).'),
        el('div', { class: 'grid-fields pairs' }, analysis(FREQUENCIES)));
      const ports = card('Reference, level and noise band',
        el('p', { class: 'intro' }, 'The impedance the S-parameters are referred to, the level of the large-signal tone (the Swing panel’s), and the band the output noise is added up over.'),
        el('div', { class: 'grid-fields pairs' }, analysis(PORTS)));

      const cells = {};
      const readout = el('dl', { class: 'readout roomy' }, FIGURES.map(([k, label]) => {
        cells[k] = el('dd', { 'data-key': k }, '—');
        return el('div', {}, el('dt', {}, label), cells[k]);
      }));
      const problem = el('p', { class: 'error', 'aria-live': 'polite', hidden: true });
      const stale = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
      const gives = card('What these settings give', problem, stale, readout);
      gives.classList.add('wide');

      const { fmt, known } = { fmt: HR.fmt, known: HR.known };
      const db = (v) => (known(v) ? fmt(v, 'dB') : '—');
      const render = (r) => {
        const d = r.design;
        const f = r.f_hz.filter(known);
        cells.gain.textContent = `${db(d.gain_db)} at ${fmt(r.f_design_hz, 'Hz', 4)}`;
        cells.sweep.textContent = f.length ? `${fmt(f[0], 'Hz', 3)} … ${fmt(f[f.length - 1], 'Hz', 3)}` : '—';
        cells.points.textContent = String(f.length);
        cells.sparams.textContent = `${db(d.s11_db)}, ${db(d.s21_db)}`;
        cells.band_noise.textContent = known(d.integrated_noise_v) ? fmt(d.integrated_noise_v, 'Vrms', 3) : 'no noise band set';
      };

      container.append(el('h1', {}, 'Brief'),
        el('p', { class: 'lede' }, 'What the design is called and where it is analysed. Every panel uses these settings; each change is one step of Undo.'),
        el('div', { class: 'cards' }, named, where, ports, gives));
      // The figures come from the response report, in a worker as the Response
      // panel's (a long sweep of a many-inverter part is no main-thread call).
      HR.background.follow(container, {
        name: 'responseReport',
        args: (text) => [text],
        lane: 'brief',
        keep: true,
        delay: 0,
        quiet: HR.background.QUIET,
        progress: () => {},
        render,
        // What no field here takes (a bad value of another panel's) is said above the figures.
        report: (error, field) => {
          problem.textContent = error && !field ? HR.words(error) : '';
          problem.hidden = !problem.textContent;
        },
        stale: (why, rendered) => {
          readout.classList.toggle('stale', Boolean(why));
          stale.hidden = !(why && rendered);
        },
      });
    },
  });

  HR.brief = { idOf };
})();
