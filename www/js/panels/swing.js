'use strict';
// Swing: how big a signal the stage takes at f_design. The quasi-static transfer curve
// with the signal's excursion on it, the waveforms and the output spectrum at the
// design's input level, output power against input power with the 1 dB point and the
// intercept lines, and the figures (HD2, HD3, THD, OP1dB, IP1dB, Psat, OIP3, IIP3 with
// its slope check, the swing against the rails) beside the power-series estimates.
// The core's swingReport takes some 30 ms for the demo but seconds for a part of many
// inverters, so it runs in a background worker (HR.background) after every edit, as the
// quick panels do, and shows a progress bar and Cancel only when a run goes on past
// HR.background.QUIET; this file lays out its result.

(() => {
  const { el, card } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const dbm = (v) => (known(v) ? fmt(v, 'dBm') : '—');
  const dbc = (v) => (known(v) ? `${fmt(v, 'dB')}c` : '—');
  const volts = (v) => (known(v) ? fmt(v, 'V', 3) : '—');
  // A percentage to three significant figures, however small (THD is often far below 1 %).
  const pct = (v) => (known(v) ? `${fixed(v, v > 0 ? Math.min(8, Math.max(2, 2 - Math.floor(Math.log10(v)))) : 2)} %` : '—');
  const css = (name) => HR.plot.css(name);
  const NEEDS_LOAD = 'needs a load resistor';

  // Figures: [key, label]; each cell holds the time-domain value and, where the
  // power series gives one, its estimate beside it.
  const FIGURES = [
    ['level', 'Input level (available, one tone)'], ['hd2', 'HD2 at the input level'], ['hd3', 'HD3 at the input level'],
    ['thd', 'THD at the input level'], ['op1db', 'Output 1 dB compression (OP1dB)'], ['ip1db', 'Input 1 dB compression (IP1dB)'],
    ['psat', 'Psat (largest output of the sweep)'], ['gt', 'Small-signal power gain GT'], ['oip3', 'Output intercept (OIP3)'],
    ['iip3', 'Input intercept (IIP3)'], ['slope', 'IM3 slope (two tones)'], ['swing', 'Last inverter’s output swing'],
  ];

  // What the reference comparison subtracts: [value, how] (HR.compare.figures).
  const DIFFS = Object.fromEntries([['hd2', 'hd2_dbc', 'dB'], ['hd3', 'hd3_dbc', 'dB'], ['thd', 'thd_pct', '×'], ['op1db', 'op1db_dbm', 'dB'],
    ['ip1db', 'ip1db_dbm', 'dB'], ['psat', 'psat_dbm', 'dB'], ['gt', 'gt_small_db', 'dB'], ['oip3', 'oip3_dbm', 'dB'],
    ['iip3', 'iip3_dbm', 'dB'], ['slope', 'im3_slope', '']].map(([k, key, how]) => [k, (r) => [[r.summary[key], how]]]));

  // "series …" beside a figure, when the power series gives one.
  const series = (v, format) => (known(v) ? `series ${format(v)}` : null);

  const figureTexts = (r) => {
    const s = r.summary;
    const load = known(s.gt_small_db);
    const slope = known(s.im3_slope)
      ? [`${fixed(s.im3_slope, 2)} dB/dB, ${s.im3_slope_ok ? 'passes' : 'fails'}`, `the 3:1 check, at ${dbm(s.ip3_measured_at_dbm)} per tone`]
      : [NEEDS_LOAD, null];
    return {
      level: [`${dbm(s.input_dbm)} at ${fmt(s.f_hz, 'Hz', 4)}`, `${volts(r.amplitude_v)} peak EMF`],
      hd2: [dbc(s.hd2_dbc), series(s.series_hd2_dbc, dbc)],
      hd3: [dbc(s.hd3_dbc), series(s.series_hd3_dbc, dbc)],
      thd: [pct(s.thd_pct), '2nd to 9th harmonics'],
      op1db: [load ? (known(s.op1db_dbm) ? dbm(s.op1db_dbm) : 'not reached in the sweep') : NEEDS_LOAD, null],
      ip1db: [load ? (known(s.ip1db_dbm) ? dbm(s.ip1db_dbm) : 'not reached in the sweep') : NEEDS_LOAD, null],
      psat: [load ? dbm(s.psat_dbm) : NEEDS_LOAD, null],
      gt: [load ? fmt(s.gt_small_db, 'dB') : NEEDS_LOAD, load ? 'at the bottom of the sweep' : null],
      oip3: [load ? dbm(s.oip3_dbm) : NEEDS_LOAD, series(s.series_oip3_dbm, dbm)],
      iip3: [load ? dbm(s.iip3_dbm) : NEEDS_LOAD, series(s.series_iip3_dbm, dbm)],
      slope,
      swing: [`${volts(s.swing_low_v)} … ${volts(s.swing_high_v)}`, `of 0 … ${volts(s.vdd_v)} (the rails)`],
    };
  };

  // What the compression and intercept figures say together, in plain words, when the
  // numbers say it: a pure cubic puts OIP3 about 10 dB above OP1dB.
  const shapeNote = (s) => {
    if (!known(s.oip3_dbm) || !known(s.op1db_dbm)) return '';
    const gap = s.oip3_dbm - s.op1db_dbm;
    const squareLaw = HR.design.get('part', 'model') === 'square-law';
    if (gap >= 15) {
      return `OIP3 sits ${fixed(gap, 1)} dB above OP1dB, against about 10 dB for a pure cubic: ${squareLaw ? 'a square-law stage' : 'this stage'} has little third-order curvature and compresses by running into the rails, not by bending. Read OIP3 for how small signals intermodulate, OP1dB for how large a signal fits.`;
    }
    if (gap >= 8 && gap <= 13) {
      return `OIP3 sits ${fixed(gap, 1)} dB above OP1dB, close to the 10 dB or so of a pure cubic: here the compression comes from the third-order curvature.`;
    }
    return '';
  };

  // When the design's own level already drives the stage past its 1 dB point.
  const levelNote = (s) => (known(s.ip1db_dbm) && s.input_dbm > s.ip1db_dbm
    ? `The input level (${dbm(s.input_dbm)}) is above IP1dB (${dbm(s.ip1db_dbm)}): the stage is compressing, so the harmonics are large and the power-series estimates no longer apply.`
    : '');

  const seriesNote = (s) => {
    const [a1, a2, a3] = s.series_a || [];
    const coeffs = [a1, a2, a3].every(known) ? ` (v(out) ≈ a1·e + a2·e² + a3·e³ with a1 = ${fmt(a1, '', 4)}, a2 = ${fmt(a2, '', 3)}/V, a3 = ${fmt(a3, '', 3)}/V²)` : '';
    return `“Series” figures are estimates from the power series of the quasi-static transfer curve at the bias point${coeffs}: they hold for small signals and need not agree once the stage compresses. The others are measured on the simulated waveforms.`;
  };

  // Whether a spectrum bin is a harmonic: its frequency is a whole multiple of f.
  const isHarmonic = (x, f) => Math.abs(x / f - Math.round(x / f)) < 1e-6;

  // A y range that takes in the data and the given levels (HR.plot's).
  const { including } = HR.plot;


  HR.panel({
    id: 'swing',
    title: 'Swing',
    mount(container) {
      let last = null;
      let shownText = null;

      // ---- Level and run ----------------------------------------------------------
      const { label, hint } = HR.field('analysis', 'input_dbm');
      const level = HR.bind('analysis', 'input_dbm', { origin: 'swing', label, hint });
      level.wrap.classList.add('level');

      const bar = el('progress', { max: 1, value: 0, 'aria-label': 'Progress of the large-signal run' });
      const barText = el('span', { class: 'run-text', 'aria-live': 'polite' }, '');
      const cancel = el('button', { type: 'button', class: 'cancel', onclick: () => follower.cancel() }, 'Cancel');
      const running = el('div', { class: 'run', hidden: true }, bar, barText, cancel);
      const now = el('button', { type: 'button', onclick: () => follower.start() }, 'Compute now');
      // The waveform is simulated again for the file, in a worker (HR.background).
      const csv = el('button', { type: 'button', disabled: true, onclick: async () => {
        const r = shownText === null ? { error: true } : await HR.background.run('waveCsv', [shownText], { lane: 'wave-csv' }).promise;
        if (r.ok !== undefined) HR.ui.download(HR.documents.named('wave', 'csv'), new Blob([r.ok], { type: 'text/csv' }));
      } }, 'Save the waveform as CSV');
      const timing = el('p', { class: 'run-note' }, 'The analysis simulates the stage in time at many signal levels, in the background; a long run shows its progress.');
      const problem = el('p', { class: 'error', 'aria-live': 'polite', hidden: true });
      const staleNote = el('p', { class: 'stale-note', hidden: true });
      const runCard = card('Signal level', el('div', { class: 'inputs' }, level.wrap), running, timing,
        el('div', { class: 'actions' }, now, csv), problem, staleNote);
      runCard.classList.add('wide');

      // ---- Figures ------------------------------------------------------------------
      const cells = {};
      const dds = {};
      const readout = el('dl', { class: 'readout swing-figures' }, FIGURES.map(([k, text]) => {
        cells[k] = { value: el('span', { class: 'value' }, '—'), aside: el('span', { class: 'aside' }) };
        dds[k] = el('dd', { 'data-key': k }, cells[k].value, cells[k].aside);
        return el('div', {}, el('dt', {}, text), dds[k]);
      }));
      const reference = HR.compare.slow('swingReport', () => render.again());
      const shape = el('p', { class: 'swing-shape', hidden: true });
      const slopeWarn = el('p', { class: 'warning', hidden: true });
      const overdriven = el('p', { class: 'warning', hidden: true });
      const estimate = el('p', { class: 'plot-note' });
      const figuresCard = card('Large-signal figures', reference.node, readout, overdriven, shape, slopeWarn, estimate);
      figuresCard.classList.add('wide');

      // ---- Plots --------------------------------------------------------------------
      const plotsCard = card('Transfer curve, waveforms, spectrum and compression', el('p', { class: 'intro' },
        'Hover for values; drag to zoom, shift-drag (or the arrow keys on a focused plot) to pan, Ctrl+wheel or +/− to zoom, double-click (or 0) to reset.'));
      plotsCard.classList.add('wide');
      const row = el('div', { class: 'plots' });
      plotsCard.append(row);
      const cell = () => row.appendChild(el('div', { class: 'plot-cell' }));
      const note = (c, text) => c.appendChild(el('p', { class: 'plot-note' }, text));

      const transferMarks = (u, ctx) => {
        if (!last) return;
        const a = last.amplitude_v;
        const [lo, hi] = [Math.min(...last.v_out), Math.max(...last.v_out)];
        HR.plot.vband(u, ctx, -a, a, css('--excursion'), 4);
        HR.plot.band(u, ctx, lo, hi, css('--excursion'));
        // The bias point: the curve's point at zero EMF.
        const mid = last.transfer_emf_v.reduce((best, e, i, all) => (Math.abs(e) < Math.abs(all[best]) ? i : best), 0);
        HR.plot.marker(u, ctx, last.transfer_emf_v[mid], last.transfer_out_v[mid], css('--plot-2'));
        HR.plot.label(u, ctx, `signal: ±${volts(a)} of EMF`, 0, hi, css('--plot-2'), { dx: 10, dy: -10 });
      };
      const transferCell = cell();
      const transferPlot = HR.plot.create(transferCell, { title: 'Transfer curve (quasi-static)', file: 'halfrail-transfer',
        x: { label: 'Source EMF, DC', unit: 'V' }, y: { label: 'v(out) at the load', unit: 'V' }, decorate: transferMarks,
        series: [{ label: 'v(out)', unit: 'V' }] });
      const transferNote = note(transferCell, '');

      const waveCell = cell();
      const wavePlot = HR.plot.create(waveCell, { title: 'Input and output waveforms', file: 'halfrail-waveforms',
        x: { label: 'Time', unit: 's' }, y: { label: 'Voltage', unit: 'V' },
        series: [{ label: 'v(in)', unit: 'V' }, { label: 'v(out)', unit: 'V' }] });
      note(waveCell, 'The steady state over four cycles of f_design at the input level: v(in) at the stage’s input, v(out) across the load.');

      const railMarks = (u, ctx) => {
        if (!last) return;
        const s = last.summary;
        HR.plot.hline(u, ctx, 0, css('--bad'), '0 V rail', 'left');
        HR.plot.hline(u, ctx, s.vdd_v, css('--bad'), `Vdd ${volts(s.vdd_v)} rail`, 'left');
      };
      const railCell = cell();
      const railPlot = HR.plot.create(railCell, { title: 'Last inverter’s output and the rails', file: 'halfrail-rails',
        x: { label: 'Time', unit: 's' }, y: { label: 'Voltage', unit: 'V', range: (u, lo, hi) => including(0, last && last.summary.vdd_v)(u, lo, hi) },
        decorate: railMarks, series: [{ label: 'v(last stage)', unit: 'V' }] });
      const railNote = note(railCell, '');

      const spectrumMarks = (u, ctx) => {
        if (!last) return;
        const f = last.summary.f_hz;
        const bottom = u.scales.y.min;
        ctx.save();
        ctx.strokeStyle = css('--plot-1');
        ctx.lineWidth = 2 * devicePixelRatio;
        last.spectrum_f_hz.forEach((x, i) => {
          const v = last.spectrum_dbc[i];
          if (!known(v) || !isHarmonic(x, f)) return;
          ctx.beginPath();
          ctx.moveTo(u.valToPos(x, 'x', true), u.valToPos(bottom, 'y', true));
          ctx.lineTo(u.valToPos(x, 'x', true), u.valToPos(v, 'y', true));
          ctx.stroke();
        });
        ctx.restore();
        const s = last.summary;
        HR.plot.label(u, ctx, `HD2 ${dbc(s.hd2_dbc)}`, 2 * f, s.hd2_dbc, css('--plot-1'), { dx: 6, dy: -6 });
        HR.plot.label(u, ctx, `HD3 ${dbc(s.hd3_dbc)}`, 3 * f, s.hd3_dbc, css('--plot-1'), { dx: 6, dy: -6 });
      };
      const spectrumCell = cell();
      const spectrumPlot = HR.plot.create(spectrumCell, { title: 'Output spectrum', file: 'halfrail-spectrum',
        x: { label: 'Frequency', unit: 'Hz' }, y: { label: 'Level (dBc)', unit: '', range: (u, lo, hi) => [Math.max(lo, -200) - 10, 10] },
        decorate: spectrumMarks,
        series: [
          { label: 'harmonic (dBc)', unit: '', opts: { paths: () => null, points: { show: true, size: 7 } } },
          { label: 'floor (dBc)', unit: '', opts: { stroke: css('--muted'), paths: () => null, points: { show: true, size: 4 } } },
        ] });
      const spectrumNote = note(spectrumCell, '');

      const poutMarks = (u, ctx) => {
        if (!last) return;
        const s = last.summary;
        if (known(s.op1db_dbm) && known(s.ip1db_dbm)) {
          HR.plot.marker(u, ctx, s.ip1db_dbm, s.op1db_dbm, css('--plot-2'));
          HR.plot.label(u, ctx, `OP1dB ${dbm(s.op1db_dbm)}`, s.ip1db_dbm, s.op1db_dbm, css('--plot-2'), { dx: 10, dy: 16 });
        }
        if (known(s.psat_dbm)) HR.plot.hline(u, ctx, s.psat_dbm, css('--plot-4'), `Psat ${dbm(s.psat_dbm)}`, 'left');
        if (known(s.oip3_dbm) && known(s.iip3_dbm)) {
          HR.plot.marker(u, ctx, s.iip3_dbm, s.oip3_dbm, css('--plot-3'));
          HR.plot.label(u, ctx, `OIP3 ${dbm(s.oip3_dbm)}`, s.iip3_dbm, s.oip3_dbm, css('--plot-3'), { align: 'right', dx: -10, dy: -8 });
        }
      };
      const poutCell = cell();
      poutCell.classList.add('wide');
      const poutPlot = HR.plot.create(poutCell, { title: 'Output power against input power', file: 'halfrail-compression',
        x: { label: 'Pin, available per tone', unit: 'dBm' },
        y: { label: 'Pout at the load', unit: 'dBm', range: (u, lo, hi) => poutRange || [lo, hi] },
        decorate: poutMarks,
        series: [
          { label: 'Pout (one tone)', unit: 'dBm', opts: { spanGaps: true } },
          { label: '1:1 line', unit: 'dBm', opts: { stroke: css('--plot-1'), dash: [6, 5], width: 1.5 } },
          { label: '3:1 line', unit: 'dBm', opts: { stroke: css('--plot-3'), dash: [6, 5], width: 1.5 } },
          { label: 'IM3 (per tone)', unit: 'dBm', opts: { stroke: css('--plot-3'), paths: () => null, points: { show: true, size: 8, fill: css('--plot-3') } } },
        ] });
      const poutNote = note(poutCell, '');
      let poutRange = null;

      // Output power against input: the sweep, the two-tone points and the two
      // straight lines drawn through the intercept the core found (slope 1 for the
      // fundamental, 3 for the third-order products), on one x axis.
      const poutData = (r) => {
        const s = r.summary;
        const sweep = r.sweep_pin_dbm.map((x, i) => [x, r.sweep_pout_dbm[i]]);
        const im3 = new Map(r.two_tone.map((t) => [t[0], t[2]]));
        const xs = [...r.sweep_pin_dbm, ...r.two_tone.map((t) => t[0])];
        const lines = known(s.oip3_dbm) && known(s.iip3_dbm);
        // The lines reach the intercept when it is within reach of the sweep.
        const top = Math.max(...xs);
        if (lines) xs.push(s.iip3_dbm <= top + 45 ? s.iip3_dbm + 3 : top + 10);
        const x = [...new Set(xs)].sort((a, b) => a - b);
        const pout = new Map(sweep);
        // From below the lowest measured point (the lines run on below it) to the intercept.
        const measured = [...r.sweep_pout_dbm, ...r.two_tone.map((t) => t[2])].filter(known);
        poutRange = uPlot.rangeNum(Math.min(...measured) - 8, Math.max(...measured, lines ? s.oip3_dbm + 3 : -Infinity), 0.05, true);
        return [x,
          x.map((v) => (pout.has(v) && known(pout.get(v)) ? pout.get(v) : null)),
          x.map((v) => (lines ? s.oip3_dbm + (v - s.iip3_dbm) : null)),
          x.map((v) => (lines ? s.oip3_dbm + 3 * (v - s.iip3_dbm) : null)),
          x.map((v) => (im3.has(v) && known(im3.get(v)) ? im3.get(v) : null))];
      };

      const render = HR.compare.rerender((r, { ms, text }) => {
        last = r;
        shownText = text;
        csv.disabled = false;
        const s = r.summary;
        const texts = figureTexts(r);
        for (const [k] of FIGURES) {
          cells[k].value.textContent = texts[k][0];
          cells[k].aside.textContent = texts[k][1] || '';
        }
        reference.offer(text, r);
        HR.compare.figures(dds, (x) => Object.fromEntries(Object.entries(figureTexts(x)).map(([k, [v]]) => [k, v])), DIFFS, r, reference.result());
        const shapeText = shapeNote(s);
        shape.textContent = shapeText;
        shape.hidden = !shapeText;
        slopeWarn.hidden = !(known(s.im3_slope) && !s.im3_slope_ok);
        slopeWarn.textContent = slopeWarn.hidden ? '' : `The third-order products did not rise 3 dB per dB at the levels tried (slope ${fixed(s.im3_slope, 2)}), so the OIP3 and IIP3 figures are doubtful.`;
        overdriven.textContent = levelNote(s);
        overdriven.hidden = !overdriven.textContent;
        estimate.textContent = seriesNote(s);
        const took = ms < 1000 ? `${fixed(ms, 0)} ms` : `${fixed(ms / 1000, 2)} s`;
        timing.textContent = `Computed in ${took} in a background worker, for ${dbm(s.input_dbm)} at ${fmt(s.f_hz, 'Hz', 4)}.`;

        transferPlot.setData([r.transfer_emf_v, r.transfer_out_v]);
        transferNote.textContent = `v(out) at the load against a slowly varied source EMF, the coupling capacitors holding their bias charge. Shaded: the signal’s excursion at the input level (±${volts(r.amplitude_v)} of EMF) and the output it gives${r.amplitude_v < 0.02 * Math.max(...r.transfer_emf_v) ? ' — a thin sliver here: drag across it to zoom in' : ''}.`;
        wavePlot.setData([r.t_s, r.v_in, r.v_out]);
        railPlot.setData([r.t_s, r.v_last]);
        railNote.textContent = `The last inverter’s output, before the output coupling, on the scale of its supply: it swings ${volts(s.swing_low_v)} … ${volts(s.swing_high_v)} between rails at 0 and ${volts(s.vdd_v)}.`;
        const f = s.f_hz;
        spectrumPlot.setData([r.spectrum_f_hz,
          r.spectrum_dbc.map((v, i) => (known(v) && isHarmonic(r.spectrum_f_hz[i], f) ? v : null)),
          r.spectrum_dbc.map((v, i) => (known(v) && !isHarmonic(r.spectrum_f_hz[i], f) ? v : null))]);
        const top = Math.round(Math.max(...r.spectrum_f_hz) / f);
        spectrumNote.textContent = `The output’s harmonics at the input level, relative to the fundamental (0 dBc), up to the ${top}th. The small grey dots between them are the computation’s numerical floor, not a signal.`;
        const hasSweep = r.sweep_pin_dbm.length > 0;
        poutPlot.node.hidden = !hasSweep;
        if (hasSweep) poutPlot.setData(poutData(r));
        poutNote.textContent = hasSweep
          ? `Solid: the output power of one tone against the available input power. Dashed: the fundamental’s 1:1 line and the third-order products’ 3:1 line through the two-tone measurements (dots, per tone), extrapolated until they meet at OIP3${s.im3_slope_ok ? '' : ' (the measured slope was not 3: see the figures)'}. Ring: the 1 dB compression point.`
          : 'Output power against input power needs a load resistor (stage.load_ohm): without one there is no output power to sweep or intercept to find.';
      });

      container.append(el('h1', {}, 'Swing'),
        el('p', { class: 'lede' }, 'How big a signal the stage takes at f_design: the same circuit simulated in time, from the design’s input level up into compression, with its harmonics, its 1 dB compression point and its third-order intercept.'),
        el('div', { class: 'cards' }, runCard, figuresCard, plotsCard));

      const progress = (p) => {
        running.hidden = p === null;
        if (p === null) return;
        bar.value = p;
        barText.textContent = `Computing… ${fixed(100 * p, 0)} %`;
      };
      // After every edit, in a worker kept between runs (a drag's stale run finishes and
      // the latest goes next); the bar only for a run longer than QUIET.
      const follower = HR.background.follow(container, {
        name: 'swingReport',
        args: (text) => [text],
        delay: 0, quiet: HR.background.QUIET, keep: true,
        render,
        progress,
        report: (error) => {
          problem.textContent = HR.words(error);
          problem.hidden = !error;
        },
        stale: HR.background.staleMarker(staleNote, [readout, row]),
      });
    },
  });
})();
