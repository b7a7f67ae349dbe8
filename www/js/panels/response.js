'use strict';
// Response: the stage's small-signal behaviour against frequency — gain and phase,
// input impedance and return loss, noise figure and input noise — with the design
// frequency and the band edges marked. Every figure comes from the core.

(() => {
  const { el, card, table, fillRows } = HR.ui;

  const FIGURES = [
    ['gain', 'Gain at f_design'], ['ideal', 'Ideal −R fb/R in'], ['gt', 'Power gain GT'],
    ['band', 'Band edges (−3 dB)'], ['zin', 'Input impedance'], ['rl', 'Return loss'],
    ['nf', 'Noise figure'], ['en', 'Input noise (stage)'], ['band_noise', 'Output noise in the noise band'], ['mu', 'Stability μ'],
  ];

  // A noise source as a person names it: a component by its label (`R fb`), an
  // inverter of the part (the core's element `stage 2`) by its place in the part.
  const sourceName = (name) => {
    const f = HR.fieldAt(`stage.${name}`);
    if (f) return f.label;
    const m = /^stage (\d+)$/.exec(name);
    return m ? `Inverter ${m[1]} (channel noise)` : name;
  };

  HR.panel({
    id: 'response',
    title: 'Response',
    mount(container) {
      const cells = {};
      const readout = el('dl', { class: 'readout' }, FIGURES.map(([k, label]) => {
        cells[k] = el('dd', { 'data-key': k }, '—');
        return el('div', {}, el('dt', {}, label), cells[k]);
      }));
      const problem = el('p', { class: 'error', 'aria-live': 'polite' });
      const stale = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
      const shares = table('Who makes the output noise at f_design', ['Source', 'Share']);
      const figures = card('At the design frequency', problem, stale,
        HR.health.voids(readout, ['gain', 'gt', 'band', 'zin', 'rl', 'nf', 'en', 'band_noise', 'mu']), readout, el('div', { class: 'scroll' }, shares.node));
      figures.classList.add('wide');
      // The sweep is computed again for the file, in a worker (it can be long).
      const csv = el('button', { type: 'button', onclick: async () => {
        const r = await HR.background.run('sweepCsv', [HR.design.text()], { lane: 'sweep-csv' }).promise;
        if (r.ok !== undefined) HR.ui.download(HR.documents.named('sweep', 'csv'), new Blob([r.ok], { type: 'text/csv' }));
      } }, 'Save the sweep as CSV');
      const plotsCard = card('Against frequency', el('p', { class: 'intro' },
        'Dashed lines mark the design frequency and the band edges. Hover for values; drag to zoom, shift-drag (or the arrow keys on a focused plot) to pan, Ctrl+wheel or +/− to zoom about the cursor, double-click (or 0) to reset.'),
        el('div', { class: 'actions' }, csv));
      plotsCard.classList.add('wide');
      const row = el('div', { class: 'plots' });
      plotsCard.append(row);
      let last = null;
      const marks = (u, ctx) => {
        if (!last) return;
        const d = last.design;
        HR.plot.vline(u, ctx, last.f_design, HR.plot.css('--plot-2'), 'f_design', 1);
        HR.plot.vline(u, ctx, d.f_low_hz, HR.plot.css('--plot-3'), 'f_low');
        HR.plot.vline(u, ctx, d.f_high_hz, HR.plot.css('--plot-3'), 'f_high');
      };
      const freq = { label: 'Frequency', unit: 'Hz' };
      const plots = [
        [HR.plot.create(row, { title: 'Voltage gain', file: 'halfrail-gain', x: freq, y: { label: 'Gain', unit: 'dB' }, logX: true, decorate: marks,
          series: [{ label: 'Av', unit: 'dB' }, { label: 'GT', unit: 'dB' }] }), (r) => [r.gain_db, r.gt_db]],
        [HR.plot.create(row, { title: 'Phase of the voltage gain (continuous)', file: 'halfrail-phase', x: freq, y: { label: 'Phase', unit: '°' }, logX: true, decorate: marks,
          series: [{ label: 'Phase', unit: '' }] }), (r) => [r.phase_unwrapped_deg]],
        [HR.plot.create(row, { title: 'Input impedance', file: 'halfrail-zin', x: freq, y: { label: 'Zin', unit: 'Ω' }, logX: true, decorate: marks,
          series: [{ label: 'Re Zin', unit: 'Ω' }, { label: 'Im Zin', unit: 'Ω' }] }), (r) => [r.zin_re_ohm, r.zin_im_ohm]],
        [HR.plot.create(row, { title: 'Return loss against the source', file: 'halfrail-return-loss', x: freq, y: { label: 'Return loss', unit: 'dB' }, logX: true, decorate: marks,
          series: [{ label: 'RL', unit: 'dB' }] }), (r) => [r.rl_db]],
        [HR.plot.create(row, { title: 'Noise figure (source at 290 K)', file: 'halfrail-noise-figure', x: freq, y: { label: 'NF', unit: 'dB' }, logX: true, decorate: marks,
          series: [{ label: 'NF', unit: 'dB' }] }), (r) => [r.nf_db]],
        [HR.plot.create(row, { title: 'Input-referred noise of the stage', file: 'halfrail-input-noise', x: freq, y: { label: 'Density', unit: 'V/√Hz' }, logX: true, decorate: marks,
          series: [{ label: 'en', unit: 'V/√Hz' }] }), (r) => [r.noise_in_v_per_rthz]],
      ];
      const texts = (r) => {
        const d = r.design;
        const fmt = HR.fmt;
        return {
          gain: `${fmt(d.gain_db, 'dB')} (${fmt(d.phase_deg, '', 4)}°)`,
          ideal: d.ideal_gain_db === null ? '—' : fmt(d.ideal_gain_db, 'dB'),
          gt: d.power_gain_db === null ? 'needs source and load resistance' : fmt(d.power_gain_db, 'dB'),
          band: `${d.f_low_hz === null ? 'below the sweep' : fmt(d.f_low_hz, 'Hz', 3)} … ${d.f_high_hz === null ? 'above the sweep' : fmt(d.f_high_hz, 'Hz', 3)}`,
          zin: d.zin_re_ohm === null ? '—' : `${fmt(d.zin_re_ohm, 'Ω', 4)} ${d.zin_im_ohm < 0 ? '−' : '+'} j${fmt(Math.abs(d.zin_im_ohm), 'Ω', 3)}`,
          rl: r.return_loss_db === null ? '—' : fmt(r.return_loss_db, 'dB'),
          nf: d.nf_db === null ? 'needs a source resistance' : fmt(d.nf_db, 'dB'),
          en: `${fmt(d.noise_in_v_per_rthz, 'V', 3)}/√Hz`,
          band_noise: d.integrated_noise_v === null ? 'no noise band: set one in the Brief panel' : fmt(d.integrated_noise_v, 'Vrms', 3),
          mu: `${HR.fixed(d.mu, 3)} ${d.mu > 1 ? '(unconditionally stable)' : '(some source or load can make it oscillate)'}`,
        };
      };
      // What the reference comparison subtracts: [value, how] (HR.compare.figures).
      const DIFFS = {
        gain: ({ design: d }) => [[d.gain_db, 'dB'], [d.phase_deg, '°']], ideal: ({ design: d }) => [[d.ideal_gain_db, 'dB']],
        gt: ({ design: d }) => [[d.power_gain_db, 'dB']], band: ({ design: d }) => [[d.f_low_hz, '×'], [d.f_high_hz, '×']],
        zin: ({ design: d }) => [[d.zin_re_ohm, 'Ω'], [d.zin_im_ohm, 'Ω']], rl: (r) => [[r.return_loss_db, 'dB']],
        nf: ({ design: d }) => [[d.nf_db, 'dB']], en: ({ design: d }) => [[d.noise_in_v_per_rthz, '×']],
        band_noise: ({ design: d }) => [[d.integrated_noise_v, '×']], mu: ({ design: d }) => [[d.mu, '']],
      };
      const render = HR.compare.rerender((r) => {
        last = { ...r, f_design: r.f_design_hz };
        const t = texts(r);
        for (const [k] of FIGURES) cells[k].textContent = t[k];
        const ref = HR.compare.report('responseReport');
        HR.compare.figures(cells, texts, DIFFS, r, ref);
        fillRows(shares.tbody, r.noise_shares.slice(0, 6).map((s) => [sourceName(s.name), HR.fmt(100 * s.share, '%')]));
        for (const [plot, ys] of plots) plot.setData([r.f_hz, ...ys(r)], ref && [ref.f_hz, ...ys(ref)]);
      });
      container.append(el('h1', {}, 'Response'),
        el('p', { class: 'lede' }, 'The stage’s small-signal response over the analysis range of the design, with the finite, falling open-loop gain of the part included.'),
        el('div', { class: 'cards' }, figures, plotsCard));
      // Here when the core calls the design quick, else in a worker: a long sweep of a
      // many-inverter part outlasts a frame (worker.js).
      const box = HR.background.runBox('response');
      figures.querySelector('h2').after(box.node);
      box.attach(HR.background.follow(container, {
        job: (text) => HR.compare.along(HR.background.run('responseReport', [text], { lane: 'response', keep: true, here: HR.background.quick(text) }), [['responseReport']]),
        delay: 0, quiet: HR.background.QUIET,
        render,
        report: (error) => { problem.textContent = HR.words(error); },
        progress: box.progress,
        stale: box.stale(HR.background.staleMarker(stale, [])),
      }));
    },
  });
})();
