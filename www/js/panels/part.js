'use strict';
// Part: the inverter's parameters (from an illustrative preset or typed in), its
// operating point inside the stage, the transfer curves, and the bench fit.
// The core computes every figure; this file lays them out. Its fields are bound to
// the design (HR.bind), where the core's errors find them.

(() => {
  const { el, card, choice, table, fillRows } = HR.ui;

  // The part's fields and the bench's, in the order shown (labels and hints from
  // the core's catalogue, HR.field).
  const FIELDS = ['vdd_v', 'stages', 'kn_a_per_v2', 'kp_a_per_v2', 'vtn_v', 'vtp_v', 'lambda_n_per_v', 'lambda_p_per_v',
    'cgs_f', 'cgd_f', 'cdb_f', 'gamma', 'temp_c', 'n_slope', 'pkg_max_w'];
  const BENCH = ['vdd_v', 'stages', 'idd_a', 'vbias_v', 'load_ohm', 'load_f'];
  // A compact field of `section` bound to the design, in the catalogue's words.
  const compact = (section, key) => {
    const { label, hint } = HR.field(section, key);
    return HR.bind(section, key, { label, hint, compact: true });
  };
  const POINTS = 501;

  // The preset selector names the preset the design's part is, field for field (the
  // core compares them as it reads them: `6m` is 0.006), and says "Custom part" once
  // a field differs; it follows the part, not the rest of the design.
  const CUSTOM = 'custom';
  const partCard = (problem) => {
    const presets = HR.presets();
    const pick = choice({ label: 'Preset (illustrative, not a datasheet)', value: presets[0].id,
      options: [...presets.map((p) => [p.id, p.title]), [CUSTOM, 'Custom part (differs from every preset)']],
      onChange: () => { load.disabled = pick.select.value === CUSTOM; } });
    const custom = pick.select.querySelector(`option[value="${CUSTOM}"]`);
    custom.disabled = true;
    const load = el('button', { type: 'button', onclick: () => {
      const p = presets.find((x) => x.id === pick.select.value);
      if (p) HR.design.replace('part', JSON.parse(JSON.stringify(p.part)), `load “${p.title}”`);
    } }, 'Load preset');
    let shownFor = null;
    const follow = () => {
      // A document of the part alone: an error elsewhere in the design does not hide a preset.
      const part = JSON.stringify({ halfrail: HR.design.section('halfrail'), part: HR.design.section('part') });
      if (part === shownFor) return;
      shownFor = part;
      const r = HR.call('presetOf', part);
      const id = !r.error && r.ok ? r.ok : CUSTOM;
      pick.select.value = id;
      pick.select.dataset.matches = id;
      load.disabled = id === CUSTOM;
    };
    HR.design.onChange(follow);
    follow();
    const model = HR.bind('part', 'model', { label: HR.field('part', 'model').label, fallback: 'square-law',
      options: [['square-law', 'Square law (long channel)'], ['ekv', 'EKV (weak to strong inversion)']] });
    const fields = FIELDS.map((key) => compact('part', key));
    const node = card('Part',
      el('p', { class: 'intro' }, 'Start from an illustrative preset or type your part’s parameters (given at 25 °C). Values take engineering notation or RKM codes.'),
      el('div', { class: 'inputs' }, pick.wrap, el('div', { class: 'actions' }, load)),
      el('div', { class: 'inputs' }, model.wrap),
      el('div', { class: 'grid-fields' }, fields.map((f) => f.wrap)),
      problem);
    node.classList.add('wide');
    return { node };
  };

  const READOUT = [
    ['vin', 'Gate, stage 1'], ['vout', 'Output'], ['iq', 'Supply current'], ['power', 'Supply power'],
    ['dissipation', 'Package dissipation'], ['gm', 'gm, stage 1'], ['gds', 'gds, stage 1'], ['a0', 'Open-loop gain A0'],
    ['selfbias', 'Self-bias (source and load off)'], ['sat', 'Both saturated, output'], ['db1', 'Gain within 1 dB, output'],
  ];

  // The read-out's texts for a report (this design's or the reference's).
  const texts = (r) => {
    const b = r.bias;
    const fmt = HR.fmt;
    const window = (w) => (w ? `${fmt(w.low_v, 'V', 3)} … ${fmt(w.high_v, 'V', 3)}` : 'none at the bias');
    return {
      vin: fmt(b.vin_v, 'V', 4), vout: fmt(b.vout_v, 'V', 4), iq: fmt(b.iq_a, 'A', 3), power: fmt(b.power_w, 'W', 3),
      dissipation: fmt(b.dissipation_w, 'W', 3), gm: fmt(b.gm_s, 'S', 3), gds: fmt(b.gds_s, 'S', 3),
      a0: `${fmt(b.a0, '', 4)} V/V`, selfbias: fmt(b.self_bias_v, 'V', 4),
      sat: window(b.window_saturated), db1: window(b.window_1db),
    };
  };
  // What the reference comparison subtracts: [value, how] (HR.compare.figures).
  const DIFFS = {
    vin: (r) => [[r.bias.vin_v, 'V']], vout: (r) => [[r.bias.vout_v, 'V']], iq: (r) => [[r.bias.iq_a, 'A']],
    power: (r) => [[r.bias.power_w, 'W']], dissipation: (r) => [[r.bias.dissipation_w, 'W']],
    gm: (r) => [[r.bias.gm_s, '×']], gds: (r) => [[r.bias.gds_s, '×']], a0: (r) => [[r.bias.a0, '']],
    selfbias: (r) => [[r.bias.self_bias_v, 'V']],
  };

  const biasCard = () => {
    const cells = {};
    const readout = el('dl', { class: 'readout' }, READOUT.map(([k, label]) => {
      cells[k] = el('dd', { 'data-key': k }, '—');
      return el('div', {}, el('dt', {}, label), cells[k]);
    }));
    const warnings = el('ul', { class: 'warnings', 'aria-live': 'polite' });
    const stages = table('Each stage at its operating point', ['Stage', 'Vin', 'Vout', 'Id', 'gm', 'gds', 'Gain']);
    const stagesWrap = el('div', { class: 'scroll' }, stages.node);
    const stale = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
    const output = el('div', {}, readout, stagesWrap, warnings);
    const render = (r) => {
      const b = r.bias;
      const fmt = HR.fmt;
      const shown = texts(r);
      for (const [k, cell] of Object.entries(cells)) cell.textContent = shown[k];
      HR.compare.figures(cells, texts, DIFFS, r, HR.compare.report('partReport', POINTS));
      stagesWrap.hidden = b.stages.length < 2;
      fillRows(stages.tbody, b.stages.map((s, i) => [String(i + 1), fmt(s.vin_v, 'V', 4), fmt(s.vout_v, 'V', 4),
        fmt(s.id_a, 'A', 3), fmt(s.gm_s, 'S', 3), fmt(s.gds_s, 'S', 3), fmt(s.gain, '', 3)]));
      warnings.replaceChildren(...(b.warnings.length
        ? b.warnings.map((w) => el('li', { class: 'warning', 'data-code': w.code }, HR.textWords(w.text)))
        : [el('li', { class: 'ok' }, 'No warnings at this operating point.')]));
    };
    const node = card('Operating point', stale, output);
    node.classList.add('wide');
    return { node, render, output, stale };
  };

  const curvesCard = () => {
    let last = null;
    const node = card('Transfer curves',
      el('p', { class: 'intro' }, 'Left: the bare part, input swept from 0 to the supply, unloaded; the ring is the self-bias and the band the output range with both transistors saturated. Right: the stage in band, output against the input pin, coupling capacitors holding their bias; the ring is the operating point. Drag to zoom, double-click to reset.'));
    const row = el('div', { class: 'plots' });
    node.append(row);
    node.classList.add('wide');
    const bare = HR.plot.create(row, {
      title: 'Bare part: Vout against Vin', x: { label: 'Vin', unit: 'V' }, y: { label: 'Vout', unit: 'V' },
      series: [{ label: 'Vout', unit: 'V' }],
      decorate: (u, ctx) => {
        if (!last) return;
        const w = last.bias.window_saturated;
        if (w) HR.plot.band(u, ctx, w.low_v, w.high_v, HR.plot.css('--window'));
        HR.plot.marker(u, ctx, last.bare.bias_vin_v, last.bare.bias_vin_v, HR.plot.css('--plot-2'));
      },
    });
    const closed = HR.plot.create(row, {
      title: 'In the stage: Vout against Vin (pins)', x: { label: 'Vin', unit: 'V' }, y: { label: 'Vout', unit: 'V' },
      series: [{ label: 'Vout', unit: 'V' }],
      decorate: (u, ctx) => {
        // The operating point: the middle of the sweep, where the source EMF is zero.
        const mid = last && last.closed[Math.floor(last.closed.length / 2)];
        if (mid) HR.plot.marker(u, ctx, mid.vin_v, mid.vout_v, HR.plot.css('--plot-2'));
      },
    });
    const render = (r) => {
      last = r;
      const ref = HR.compare.report('partReport', POINTS);
      const curve = (points) => [points.map((p) => p.vin_v), points.map((p) => p.vout_v)];
      bare.setData(curve(r.bare.points), ref && curve(ref.bare.points));
      closed.setData(curve(r.closed), ref && curve(ref.closed));
    };
    return { node, render };
  };

  // Bench readings typed as lines of "frequency, gain" (gain in V/V, or with dB) and "vin, vout".
  const rows = (textValue) => textValue.split('\n').map((l) => l.trim()).filter(Boolean)
    .map((l) => l.split(/\s*[,;\t]\s*|\s{2,}|\s+(?=[-+.\d])/).filter(Boolean));
  const gainsFromText = (t) => rows(t).map(([f, g = '']) => (/dB\s*$/.test(g)
    ? { f_hz: f, gain_db: g.replace(/dB\s*$/, '').trim() } : { f_hz: f, gain_vv: g }));
  const curveFromText = (t) => rows(t).map(([vin, vout = '']) => ({ vin_v: vin, vout_v: vout }));
  const gainsToText = (g) => (g || []).map((r) => (r.gain_db !== undefined ? `${r.f_hz}, ${r.gain_db} dB` : `${r.f_hz}, ${r.gain_vv}`)).join('\n');
  const curveToText = (c) => (c || []).map((r) => `${r.vin_v}, ${r.vout_v}`).join('\n');

  // A box of readings, a line each, bound to a list of the bench section.
  const area = (key, read, write) => {
    const { label, hint } = HR.field('bench', key);
    return HR.bind('bench', key, { label, hint, rows: 4, id: `area-bench-${key}`, read, write }).wrap;
  };

  // The parameters the fit can move, as the core names them, with what each is.
  const PARAMS = [['kn', 'kn'], ['kp', 'kp'], ['vtn', 'vtn'], ['vtp', 'vtp'],
    ['lambda', 'lambda (both λ, one factor)'], ['cap', 'cap (the three capacitances, one factor)']];
  const UNIT = { kn: ['', ' A/V²'], kp: ['', ' A/V²'], vtn: ['V', ''], vtp: ['V', ''], lambda: ['', ' 1/V'], cap: ['F', ''] };
  // The significant digits of a number as JS writes it: the rounded values carry
  // only the digits their uncertainty supports, and are shown with exactly those.
  const digitsOf = (v) => String(Math.abs(v)).replace(/e.*$/, '').replace('.', '').replace(/^0+/, '').length || 1;
  // A fitted value of the part as values are typed (`6.76m`, not 0.00676): the core's
  // engineering notation to exactly those digits, kept only where it reads back as the
  // very same value (else the number itself, which always does).
  const written = (key, v) => {
    const text = HR.fmt(v, '', digitsOf(v));
    const back = HR.call('parseValue', text, HR.field('part', key).unit, '');
    return back.ok && back.ok.value === v ? text : v;
  };
  // A value with its objects' keys in order, so that two sections holding the same
  // values compare equal however their keys were added.
  const canonical = (v) => JSON.stringify(v === undefined ? null : v, (k, x) => (x && typeof x === 'object' && !Array.isArray(x)
    ? Object.fromEntries(Object.keys(x).sort().map((key) => [key, x[key]])) : x));

  // Which parameters to fit: a box each, bound to bench.fit. Untouched, the boxes are
  // what the readings determine (the core says which); a refusal the choice answers
  // shows under them and flags the box to untick.
  const paramChoice = () => {
    let defaults = [];
    let askedFor = null;
    const chosen = () => {
      const explicit = HR.design.get('bench', 'fit');
      if (Array.isArray(explicit)) return explicit;
      // Asked again only when the readings change, of a document of them alone: an
      // error elsewhere in the design does not hide what they determine.
      const bench = JSON.stringify({ halfrail: HR.design.section('halfrail'), bench: HR.design.section('bench') });
      if (bench !== askedFor) {
        askedFor = bench;
        const r = HR.call('benchParams', bench);
        if (r.ok) defaults = r.ok;
        else if (!HR.design.section('bench')) defaults = [];
      }
      return defaults;
    };
    const { label } = HR.field('bench', 'fit');
    const bound = HR.bind('bench', 'fit', { label, choices: PARAMS, value: chosen,
      hint: 'Unticked, a parameter is held at the part’s current value. Until you change them, the ticks are what the readings can determine.',
      commit: (list) => {
        const before = chosen();
        const added = list.find((x) => !before.includes(x));
        const removed = before.find((x) => !list.includes(x));
        HR.design.setMany('bench', { fit: list }, added ? `fit ${added} too` : `hold ${removed} at the part’s value`);
      } });
    return { ...bound, chosen };
  };

  // Why a fit on show is not the fit of the design as it is now, in words, by what
  // changed since: the readings, the parameters chosen, or the part's values the fit
  // held (the fitted ones are only its starting point, and Use this part writes them).
  const OUTDATED = {
    readings: 'Readings changed since this fit — fit again to use its part.',
    choice: 'The parameters to fit changed since this fit — fit again to use its part.',
    part: 'The part’s held values changed since this fit — fit again to use its part.',
  };

  // The judgement's figures: χ²/dof against its bound, the furthest reading, the loose parameters.
  const JUDGED = [['chi2', 'χ² per degree of freedom'], ['worst', 'Furthest reading'], ['loose', 'Uncertainty above the value']];

  const fitCard = (panel) => {
    const fields = BENCH.map((key) => compact('bench', key));
    const gains = area('gains', gainsFromText, gainsToText);
    const curve = area('curve', curveFromText, curveToText);
    const choose = paramChoice();
    const message = el('p', { class: 'error', 'aria-live': 'polite' });
    const params = table('Fitted parameters (±1σ from the Jacobian), to the digits their uncertainty supports', ['Parameter', 'Value', '±1σ']);
    const residuals = table('Each reading against the fitted part', ['Reading', 'Measured', 'Fitted', 'In σ']);
    const verdict = el('p', { class: 'verdict', 'aria-live': 'polite' });
    const judged = {};
    const judgedList = el('dl', { class: 'readout judged' }, JUDGED.map(([k, text]) => {
      judged[k] = el('dd', { 'data-key': k }, '—');
      return el('div', {}, el('dt', {}, text), judged[k]);
    }));
    const outdated = el('p', { class: 'stale-note outdated', hidden: true, role: 'status' });
    const figures = el('div', {}, verdict, judgedList,
      el('div', { class: 'scroll' }, params.node), el('div', { class: 'scroll' }, residuals.node));
    const results = el('div', { hidden: true }, outdated, figures);
    let fitted = null;
    // What the fit on show was made from: its document's bench readings and part, and
    // the parameters it moved.
    let basis = null;
    // Which of OUTDATED the fit on show is, or '' while it is the design's own.
    const outdatedBy = () => {
      if (!basis) return '';
      const now = JSON.parse(HR.design.text());
      const bench = (d) => canonical({ ...(d.bench || {}), fit: undefined });
      const held = (d) => canonical(Object.fromEntries(Object.entries(d.part || {}).filter(([k]) => !(k in fitted))));
      if (bench(now) !== bench(basis.doc)) return 'readings';
      if (canonical([...choose.chosen()].sort()) !== canonical([...basis.params].sort())) return 'choice';
      if (held(now) !== held(basis.doc)) return 'part';
      return '';
    };
    // Marks the fit on show as out of date (muted, with why in words) and takes its
    // part off offer until the user fits again; an undo back to its design restores it.
    const markOutdated = () => {
      const why = outdatedBy();
      outdated.hidden = !why;
      outdated.textContent = why ? OUTDATED[why] : '';
      results.dataset.outdated = why;
      figures.classList.toggle('stale', Boolean(why));
      use.disabled = !fitted || Boolean(why);
    };
    // Writes only the fitted fields, rounded to their uncertainty and as values are
    // typed, as one step: the rest of the part stays as typed.
    const use = el('button', { type: 'button', disabled: true, onclick: () => {
      if (!fitted || outdatedBy()) return;
      HR.design.setMany('part', Object.fromEntries(Object.entries(fitted).map(([k, v]) => [k, written(k, v)])), 'use the fitted part');
    } }, 'Use this part');
    HR.design.onChange(() => { if (basis) markOutdated(); });
    // The fit runs in a worker (a many-inverter EKV part takes long), with Cancel.
    let running = null;
    const busy = el('p', { class: 'busy', hidden: true, role: 'status' }, 'Fitting… ',
      el('button', { type: 'button', onclick: () => running && running.cancel() }, 'Cancel'));
    const fit = async () => {
      if (running) running.cancel();
      const text = HR.design.text();
      const mine = HR.background.run('benchFit', [text], { lane: 'fit' });
      running = mine;
      busy.hidden = false;
      const r = await mine.promise;
      if (running !== mine) return;
      running = null;
      busy.hidden = true;
      if (r.cancelled) return;
      const at = HR.bind.route(panel, r.error || null);
      message.textContent = r.error && !at ? HR.words(r.error) : '';
      if (r.error) {
        // A refused fit has no result: the last one's part is not offered as this one's.
        results.hidden = true;
        use.disabled = true;
        fitted = null;
        basis = null;
        return;
      }
      fitted = r.ok.fitted_fields;
      basis = { doc: JSON.parse(text), params: r.ok.parameters.map((p) => p.name) };
      markOutdated();
      const show = (name, v, digits) => { const [unit, after] = UNIT[name]; return `${HR.fmt(v, unit, digits)}${after}`; };
      const j = r.ok.judgement;
      fillRows(params.tbody, r.ok.parameters.map((p) => {
        const loose = j.loose.includes(p.name);
        return [p.name === 'cap' ? 'capacitance (sum)' : p.name, show(p.name, p.rounded, digitsOf(p.rounded)),
          loose ? el('span', { class: 'loose' }, `${show(p.name, p.sigma, 2)} (above the value)`) : show(p.name, p.sigma, 2)];
      }));
      const unitOf = (x) => (x.unit === 'V/V' ? ['', ' V/V'] : [x.unit, '']);
      const reading = (x, v) => `${HR.fmt(v, unitOf(x)[0], 4)}${unitOf(x)[1]}`;
      const sigmas = (v) => `${v >= 0 ? '+' : '−'}${HR.fixed(Math.abs(v), 2)}`;
      fillRows(residuals.tbody, r.ok.residuals.map((x) => [x.reading, reading(x, x.measured), reading(x, x.fitted), sigmas(x.normalized)]));
      [...residuals.tbody.rows].forEach((row, i) => {
        row.classList.toggle('disagree', j.disagreeing.includes(i));
        if (j.disagreeing.includes(i)) row.dataset.disagree = 'true';
      });
      verdict.textContent = j.text;
      verdict.className = `verdict ${j.poor ? 'warning' : 'ok'}`;
      verdict.dataset.poor = String(j.poor);
      judged.chi2.textContent = j.reduced_chi2 === null ? 'none (as many readings as parameters)'
        : `${HR.fixed(j.reduced_chi2, 2)} (a good fit: under ${HR.fixed(j.reduced_bound, 2)})`;
      const w = j.worst === null ? null : r.ok.residuals[j.worst];
      judged.worst.textContent = w ? `${w.reading}, ${sigmas(w.normalized)}σ` : '—';
      judged.loose.textContent = j.loose.length ? j.loose.join(', ') : 'none';
      results.hidden = false;
      panel.dataset.fitted = String(Number(panel.dataset.fitted || 0) + 1);
    };
    const run = el('button', { type: 'button', onclick: fit }, 'Fit the part');
    const node = card('Bench fit',
      el('p', { class: 'intro' }, 'Readings you can take with a generator and a scope fit the part by least squares (Levenberg–Marquardt). Readings are weighted by usual bench accuracy: current 1 %, bias 10 mV, gain 2 %.'),
      el('div', { class: 'grid-fields' }, fields.map((f) => f.wrap)),
      el('div', { class: 'inputs' }, gains, curve), choose.wrap,
      el('div', { class: 'actions' }, run, use), busy, message, results);
    node.classList.add('wide');
    return { node };
  };

  HR.panel({
    id: 'part',
    title: 'Part',
    mount(container) {
      const problem = el('p', { class: 'error', 'aria-live': 'polite' });
      const part = partCard(problem);
      const bias = biasCard();
      const curves = curvesCard();
      const fit = fitCard(container);
      container.append(el('h1', {}, 'Part'),
        el('p', { class: 'lede' }, 'The inverter, its operating point in the stage, and its transfer curves. Figures are model estimates: verify them on the bench and check the datasheet’s limits.'),
        el('div', { class: 'cards' }, part.node, bias.node, curves.node, fit.node));
      // In a worker (HR.background.follow): a legal part of nine inverters can take
      // far longer than a frame; the box shows only once a run outlasts QUIET ms.
      const box = HR.background.runBox('operating point and curves');
      bias.node.querySelector('h2').after(box.node);
      box.attach(HR.background.follow(container, {
        job: (text) => HR.compare.along(HR.background.run('partReport', [text, POINTS], { lane: 'part', keep: true }), [['partReport', POINTS]]),
        delay: 0, quiet: HR.background.QUIET,
        render: HR.compare.rerender((r) => { bias.render(r); curves.render(r); }),
        report: (error, at) => { problem.textContent = error && !at ? HR.words(error) : ''; },
        progress: box.progress,
        stale: box.stale(HR.background.staleMarker(bias.stale, [bias.output])),
      }));
    },
  });
})();
