'use strict';
// Plots, drawn by uPlot (a small, fast canvas plotting library inlined into the page):
// axes labelled with their unit and ticked in engineering notation through the core's
// formatter, a live read-out of the values under the cursor, drag to zoom, shift-drag
// or the arrow keys to pan, Ctrl/Alt+wheel or +/− to zoom about the cursor, and
// double-click or 0 to reset. Colours come from the page's theme.

HR.plot = (() => {
  const { el } = HR.ui;
  const css = (name) => getComputedStyle(document.documentElement).getPropertyValue(name).trim();
  // Series colours chosen to stay apart in both themes and for common colour-vision deficiencies.
  const PALETTE = ['--plot-1', '--plot-2', '--plot-3', '--plot-4'];

  // On a log axis uPlot ticks 1…9 of every decade; only the decades are labelled.
  const isDecade = (v) => v > 0 && Math.abs(Math.log10(v) - Math.round(Math.log10(v))) < 1e-9;
  const axis = (label, unit, log = false) => ({
    label: unit ? `${label} (${unit})` : label,
    stroke: css('--ink'),
    grid: { stroke: css('--line'), width: 1 },
    ticks: { stroke: css('--line') },
    values: (u, ticks) => ticks.map((v) => (log && !isDecade(v) ? '' : HR.fmt(v, '', 3))),
    size: 56,
  });

  // The wheel and the keys every plot (and HR.plane's figures) answers to, on its
  // figure `wrap`: Ctrl/Alt+wheel zooms (plain scrolling scrolls the page), the arrow
  // keys pan a tenth, + and − zoom, 0 resets. `view`: {ready() → whether anything is
  // drawn, zoom(factor, e) with e the wheel event (null from a key: about the middle),
  // pan(fx, fy), reset()}. `vertical`: ↑ and ↓ pan too; `ownKeys`: only keys pressed
  // on the figure itself, not on its buttons.
  const controls = (wrap, view, { vertical = false, ownKeys = false } = {}) => {
    wrap.addEventListener('wheel', (e) => {
      if (!view.ready() || (!e.ctrlKey && !e.altKey)) return;
      e.preventDefault();
      view.zoom(e.deltaY > 0 ? 1.25 : 0.8, e);
    }, { passive: false });
    wrap.addEventListener('keydown', (e) => {
      if (!view.ready() || (ownKeys && e.target !== wrap)) return;
      const keys = { ArrowLeft: () => view.pan(-0.1, 0), ArrowRight: () => view.pan(0.1, 0),
        '+': () => view.zoom(0.8, null), '=': () => view.zoom(0.8, null), '-': () => view.zoom(1.25, null), 0: () => view.reset() };
      if (vertical) Object.assign(keys, { ArrowUp: () => view.pan(0, 0.1), ArrowDown: () => view.pan(0, -0.1) });
      if (keys[e.key]) { keys[e.key](); e.preventDefault(); }
    });
  };

  // A button that saves the figure's canvas (`canvas()`, null: nothing drawn) as a PNG
  // named from the design's title and `file` (`halfrail-gain` → `<title>-gain.png`,
  // or `halfrail-gain.png` without a title: HR.documents.named).
  const pngButton = (title, file, canvas) => el('button', { type: 'button', class: 'small', 'aria-label': `Save “${title}” as PNG`,
    onclick: () => {
      const c = canvas();
      const name = HR.documents.named(file.replace(/^halfrail-/, ''), 'png');
      if (c) c.toBlob((blob) => HR.ui.download(name, blob));
    } }, 'PNG');

  // create(container, {title, file, x: {label, unit, legend, categories}, y: {label, unit, range, values},
  //   series: [{label, unit, opts}], logX, height, decorate(u, ctx)}) → {setData([xs, ...ys]), node}
  // `y.range(u, dataMin, dataMax)` → [min, max] sets the y range (uPlot's own scale option);
  // `y.values(ticks, increment)` → the tick labels, where engineering notation does not
  // suit (a level in dBm). `x.legend`: the x's name in the legend (default: its label).
  // A series' `opts` are uPlot series options laid over the defaults (stroke, dash,
  // spanGaps, points, paths: () => null for points alone). `file`: the PNG's name.
  //
  // `x.categories`: the x values given to setData are names (a chain's nodes, named by
  // their blocks), drawn at 0, 1, 2… with each name under its point, cut to the room it
  // has. Such a plot is read by hovering: nothing to zoom or pan along names.
  const create = (container, spec) => {
    const wrap = el('figure', { class: 'plot' }, el('figcaption', {}, spec.title));
    container.append(wrap);
    const cats = Boolean(spec.x.categories);
    let names = []; // the category axis's names, as last given
    const cut = (u, text) => {
      const room = Math.max(4, Math.floor(u.bbox.width / devicePixelRatio / Math.max(1, names.length) / 7));
      return text.length > room ? `${text.slice(0, room - 1)}…` : text;
    };
    const xAxis = cats
      ? { ...axis(spec.x.label, spec.x.unit), splits: () => names.map((_, i) => i), values: (u, splits) => splits.map((i) => cut(u, names[i] || '')) }
      : axis(spec.x.label, spec.x.unit, spec.logX);
    const yAxis = spec.y.values
      ? { ...axis(spec.y.label, spec.y.unit), values: (u, ticks, i, space, incr) => spec.y.values(ticks, incr) }
      : axis(spec.y.label, spec.y.unit);
    const xScale = cats ? { time: false, range: (u, lo, hi) => [lo - 0.3, hi + 0.3] } : spec.logX ? { time: false, distr: 3, log: 10 } : { time: false };
    const opts = {
      width: Math.max(320, wrap.clientWidth || 560),
      height: spec.height || 300,
      scales: { x: xScale, y: spec.y.range ? { range: spec.y.range } : {} },
      axes: [xAxis, yAxis],
      cursor: cats ? { drag: { x: false, y: false } } : {
        drag: { x: true, y: true },
        // Shift-drag pans instead of selecting a zoom box.
        bind: { mousedown: (u, target, handler) => (e) => { if (!e.shiftKey) handler(e); return null; } },
      },
      legend: { live: true },
      series: [
        { label: spec.x.legend || spec.x.label,
          value: (u, v) => (v === null || v === undefined ? '—' : cats ? names[v] || '—' : HR.fmt(v, spec.x.unit || '', 4)) },
        ...spec.series.map((s, i) => ({
          label: s.label,
          stroke: css(PALETTE[i % PALETTE.length]),
          width: 2,
          points: { show: false },
          value: (u, v) => (v === null || v === undefined ? '—' : HR.fmt(v, s.unit || '', 4)),
          ...(s.opts || {}),
        })),
      ],
      hooks: {
        draw: spec.decorate ? [(u) => spec.decorate(u, u.ctx)] : [],
        // The x range shown, kept on the figure for read-outs and tests.
        setScale: [(u, key) => { if (key === 'x') wrap.dataset.xRange = `${u.scales.x.min} ${u.scales.x.max}`; }],
      },
    };
    let chart = null;
    const resize = () => chart && chart.setSize({ width: Math.max(320, wrap.clientWidth), height: opts.height });
    // The x range in the scale's own coordinates (log10 of the value on a log axis).
    const toAxis = (v) => (spec.logX ? Math.log10(v) : v);
    const fromAxis = (v) => (spec.logX ? 10 ** v : v);
    const setX = (lo, hi) => chart && chart.setScale('x', { min: fromAxis(lo), max: fromAxis(hi) });
    const range = () => [toAxis(chart.scales.x.min), toAxis(chart.scales.x.max)];
    // Moves the x range by `fraction` of its width; zooms it by `factor` about `at` (0…1 across).
    const pan = (fraction) => { const [lo, hi] = range(); const d = (hi - lo) * fraction; setX(lo + d, hi + d); };
    const zoom = (factor, at = 0.5) => {
      const [lo, hi] = range();
      const centre = lo + (hi - lo) * at;
      setX(centre - (centre - lo) * factor, centre + (hi - centre) * factor);
    };
    if (!cats) {
      let dragFrom = null;
      wrap.addEventListener('mousedown', (e) => { if (chart && e.shiftKey) dragFrom = { x: e.clientX, range: range() }; });
      window.addEventListener('mousemove', (e) => {
        if (!dragFrom) return;
        const [lo, hi] = dragFrom.range;
        const d = -((e.clientX - dragFrom.x) / chart.over.clientWidth) * (hi - lo);
        setX(lo + d, hi + d);
      });
      window.addEventListener('mouseup', () => { dragFrom = null; });
      wrap.tabIndex = 0;
      wrap.setAttribute('aria-label', `${spec.title}. Arrow keys pan, + and − zoom, 0 resets.`);
      // The wheel zooms about the cursor (0…1 across the plot); the keys about the middle.
      controls(wrap, {
        ready: () => Boolean(chart),
        zoom: (factor, e) => {
          if (!e) { zoom(factor); return; }
          const box = chart.over.getBoundingClientRect();
          zoom(factor, Math.min(1, Math.max(0, (e.clientX - box.left) / box.width)));
        },
        pan: (fx) => pan(fx),
        reset: () => setX(toAxis(chart.data[0][0]), toAxis(chart.data[0][chart.data[0].length - 1])),
      });
    }
    new ResizeObserver(resize).observe(wrap);
    wrap.querySelector('figcaption').append(' ', pngButton(spec.title, spec.file || 'plot', () => wrap.querySelector('canvas')));
    // On a category axis, names as x become their places 0, 1, 2….
    const placed = (d) => (cats && d ? [d[0].map((_, i) => i), ...d.slice(1)] : d);
    return {
      node: wrap,
      // `ref`: the reference design's [xs, ...ys] for the first series, or null.
      setData(data, ref = null) {
        if (cats) names = data[0];
        chart = draw(chart, wrap, opts, placed(data), placed(ref), spec.logX);
      },
    };
  };

  // The reference design under a plot. uPlot takes one x array per plot, so the
  // reference's values are put on the plot's x: as they are when the two x arrays are
  // equal (the same analysis section, the same curve grid), else interpolated linearly
  // (in log x on a log axis) at the plot's x — for display; the figures are the core's —
  // with its points beyond the plot's x range added at the ends, where this design's
  // series are empty. (uPlot's mode 2, an x per series, would lose the shared cursor
  // read-out.) → [x, ...ys, ...the reference's ys], and whether the x was shared.
  const merge = (data, ref, log) => {
    const [xs, ...ys] = data;
    const [rx, ...rys] = ref;
    if (xs.length === rx.length && xs.every((v, i) => v === rx[i])) return [[...data, ...rys], true];
    const before = rx.filter((v) => v < xs[0]);
    const after = rx.filter((v) => v > xs[xs.length - 1]);
    const x = [...before, ...xs, ...after];
    const t = log ? Math.log : (v) => v;
    const at = (ry) => {
      let j = 0;
      return x.map((v) => {
        while (j < rx.length - 2 && rx[j + 1] < v) j += 1;
        const [x0, x1, y0, y1] = [rx[j], rx[j + 1], ry[j], ry[j + 1]];
        if (v === x0 || v === x1) return v === x0 ? y0 : y1;
        if (!(v > x0 && v < x1) || !HR.known(y0) || !HR.known(y1)) return null;
        return y0 + ((y1 - y0) * (t(v) - t(x0))) / (t(x1) - t(x0));
      });
    };
    const pad = (y) => [...before.map(() => null), ...y, ...after.map(() => null)];
    return [[x, ...ys.map(pad), ...rys.map(at)], false];
  };

  // Draws `data` with the reference `ref` (or none) in the uPlot `chart` (null: none
  // yet) on `wrap`, made again when the reference's series come or go; → the chart.
  // The reference's series: muted, dashed, "reference" in the legend.
  const draw = (chart, wrap, opts, data, ref, log = false) => {
    const n = ref ? ref.length - 1 : 0;
    const [all, same] = ref ? merge(data, ref, log) : [data];
    wrap.dataset.reference = ref ? (same ? 'same-x' : 'resampled') : '';
    if (chart && chart.series.length === data.length + n) {
      chart.setData(all);
      return chart;
    }
    if (chart) chart.destroy();
    const muted = css('--muted');
    const twins = opts.series.slice(1, n + 1).map((s, i) => ({ ...s, label: n > 1 ? `reference ${s.label}` : 'reference',
      stroke: muted, width: 1.5, dash: i % 2 ? [2, 3] : [6, 4], fill: undefined, points: { ...s.points, stroke: muted, fill: muted } }));
    wrap.uplot = new uPlot({ ...opts, width: Math.max(320, wrap.clientWidth || opts.width), series: [...opts.series, ...twins] }, all, wrap);
    return wrap.uplot;
  };

  // A y range (spec.y.range) that takes in the data and the given levels (the 0 dB or
  // −180° line a figure is read against), padded as uPlot pads.
  const including = (...levels) => (u, lo, hi) => {
    const all = [lo, hi, ...levels].filter(HR.known);
    if (!all.length) return [0, 1];
    const [a, b] = [Math.min(...all), Math.max(...all)];
    return uPlot.rangeNum(a, b === a ? a + 1 : b, 0.1, true);
  };

  // Fills a horizontal band between two y values (e.g. a linear window).
  const band = (u, ctx, low, high, colour) => {
    const top = u.valToPos(high, 'y', true);
    const bottom = u.valToPos(low, 'y', true);
    ctx.save();
    ctx.fillStyle = colour;
    ctx.fillRect(u.bbox.left, top, u.bbox.width, bottom - top);
    ctx.restore();
  };

  // A ring round canvas point (x, y): a marked point, here and on HR.plane's figures.
  const ring = (ctx, x, y, radius, colour) => {
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.lineWidth = 2;
    ctx.beginPath();
    ctx.arc(x, y, radius, 0, 2 * Math.PI);
    ctx.stroke();
    ctx.restore();
  };

  // Marks a point (in the plot's values) with a ring.
  const marker = (u, ctx, x, y, colour) => ring(ctx, u.valToPos(x, 'x', true), u.valToPos(y, 'y', true), 6, colour);

  // Text with a halo of the surface colour, so a label reads over grid lines and
  // curves, in the context's fill colour; `width`: the halo's, in the canvas's units
  // (uPlot's canvas is in device pixels, HR.plane's is scaled to CSS pixels).
  const halo = (ctx, text, x, y, width = 3 * devicePixelRatio) => {
    ctx.save();
    ctx.setLineDash([]);
    ctx.lineWidth = width;
    ctx.strokeStyle = css('--surface');
    ctx.strokeText(text, x, y);
    ctx.restore();
    ctx.fillText(text, x, y);
  };

  // Fills a vertical band between two x values, at least `minPx` CSS pixels wide so a
  // narrow one (a small signal's excursion) still shows.
  const vband = (u, ctx, low, high, colour, minPx = 3) => {
    let left = u.valToPos(low, 'x', true);
    let right = u.valToPos(high, 'x', true);
    const short = minPx * devicePixelRatio - (right - left);
    if (short > 0) { left -= short / 2; right += short / 2; }
    ctx.save();
    ctx.fillStyle = colour;
    ctx.fillRect(left, u.bbox.top, right - left, u.bbox.height);
    ctx.restore();
  };

  // A label at a point given in data coordinates, haloed, kept inside the plot box;
  // `dx`, `dy` shift it in CSS pixels.
  const label = (u, ctx, text, x, y, colour, { align = 'left', dx = 0, dy = 0 } = {}) => {
    if (x === null || x === undefined || y === null || y === undefined) return;
    const dpr = devicePixelRatio;
    ctx.save();
    ctx.font = `${12 * dpr}px sans-serif`;
    ctx.fillStyle = colour;
    const w = ctx.measureText(text).width;
    const px = u.valToPos(x, 'x', true) + dx * dpr;
    let py = u.valToPos(y, 'y', true) + dy * dpr;
    let left = align === 'right' ? px - w : px;
    left = Math.max(u.bbox.left + 3 * dpr, Math.min(left, u.bbox.left + u.bbox.width - w - 3 * dpr));
    py = Math.max(u.bbox.top + 12 * dpr, Math.min(py, u.bbox.top + u.bbox.height - 4 * dpr));
    ctx.textAlign = 'left';
    halo(ctx, text, left, py);
    ctx.restore();
  };

  // A labelled vertical line at x (a design frequency, a band edge).
  const vline = (u, ctx, x, colour, label, row = 0) => {
    if (x === null || x === undefined || x < u.scales.x.min || x > u.scales.x.max) return;
    const px = u.valToPos(x, 'x', true);
    dashed(ctx, colour, [5, 4], [px, u.bbox.top], [px, u.bbox.top + u.bbox.height], 'left', label, px + 4, u.bbox.top + (14 + 14 * row) * devicePixelRatio);
  };

  // A labelled horizontal line at y (a reference level: 0 dB, −180°, μ = 1), labelled
  // at the `side` ('left' or 'right') of the plot.
  const hline = (u, ctx, y, colour, label, side = 'right') => {
    if (y === null || y === undefined || y < u.scales.y.min || y > u.scales.y.max) return;
    const py = u.valToPos(y, 'y', true);
    const lx = side === 'left' ? u.bbox.left + 4 * devicePixelRatio : u.bbox.left + u.bbox.width - 4 * devicePixelRatio;
    dashed(ctx, colour, [2, 3], [u.bbox.left, py], [u.bbox.left + u.bbox.width, py], side, label, lx, py - 4 * devicePixelRatio);
  };

  // A dashed reference line from `from` to `to` (canvas pixels) with its label at (lx, ly).
  const dashed = (ctx, colour, dash, from, to, align, label, lx, ly) => {
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.fillStyle = colour;
    ctx.setLineDash(dash);
    ctx.lineWidth = 1.5;
    ctx.beginPath();
    ctx.moveTo(...from);
    ctx.lineTo(...to);
    ctx.stroke();
    ctx.font = `${12 * devicePixelRatio}px sans-serif`;
    ctx.textAlign = align;
    halo(ctx, label, lx, ly);
    ctx.restore();
  };

  return { create, draw, including, band, vband, marker, ring, label, vline, hline, halo, controls, pngButton, css };
})();
