'use strict';
// The printed design sheet: what Print sheet (the Design bar) and the browser's own
// print (Ctrl+P, `beforeprint`) put on paper or in a PDF, in a container that only
// `@media print` shows. Its words and figures are the core's sheetPage (the blocks of
// the same sheet as `halfrail report`, its bill of materials too), laid out with the
// schematic and its values, the gain and phase and the loop gain drawn for paper, the
// permalink (HR.documents.link: one line on the sheet, whole in a note, never a local
// path), the build and the date. sheetPage runs every analysis, the large-signal one
// too, so it never runs on the main thread: the sheet is prepared in the background
// (lane `sheet`) a pause after each change, and drawn when the page is idle. Print
// sheet waits for it; Ctrl+P, which cannot wait, prints the prepared sheet, and when
// that is of an earlier design (or there is none yet) says so on the paper in words
// rather than computing at once.
HR.sheet = (() => {
  const { el } = HR.ui;
  const INK = '#1b1f1d';
  const GRID = '#d3d8d4';
  const [C1, C2, C3] = ['#0b6e5f', '#b34700', '#5b3fa6'];
  const K = 2; // plots and schematic are drawn at this many canvas pixels a CSS pixel (and more on a dense screen)
  let link = { text: null, url: null, why: '' };
  let node = null;

  // ---- The core's sheet page (sheetPage: the blocks `halfrail report` lays out) as DOM
  const tableOf = (head, rows, right = []) => {
    const row = (tag, cells) => el('tr', {}, cells.map((c, i) => el(tag, right[i] ? { class: 'num' } : {}, c)));
    return el('table', {}, el('thead', {}, row('th', head)), el('tbody', {}, rows.map((r) => row('td', r))));
  };
  const paragraph = (text) => el('p', {}, text.split('\n').flatMap((t, i) => (i ? [el('br'), t] : [t])));
  // One block as DOM, and whether it wants the page's whole width.
  const blockOf = ({ kind, body }) => {
    switch (kind) {
      case 'paragraph': return [paragraph(HR.textWords(body)), false];
      case 'bullets': return [el('ul', {}, body.map((t) => el('li', {}, HR.textWords(t)))), true];
      case 'pairs': return [tableOf(body.head, body.rows), false];
      case 'table': return [tableOf(body.head, body.rows, body.right), body.head.length > 2];
      default: return [paragraph(String(body)), false];
    }
  };
  // A table without its `key` column: the paper is for a person, who reads the
  // components by reference and value (the keys stay in the file and `halfrail report`).
  const unkeyed = (b) => {
    const at = b.kind === 'table' ? b.body.head.indexOf('key') : -1;
    if (at < 0) return b;
    const drop = (list) => list.filter((_, i) => i !== at);
    return { kind: b.kind, body: { head: drop(b.body.head), right: drop(b.body.right), rows: b.body.rows.map(drop) } };
  };
  // → {title, sub, lead: [nodes], sections: [{head, nodes, wide}], rows: {key: [cells]}}
  const read = (page) => {
    const out = { title: page.title, sub: page.subtitle, lead: [], sections: [], rows: {} };
    for (const b of page.blocks) {
      const last = out.sections[out.sections.length - 1];
      if (b.kind === 'heading') { out.sections.push({ head: b.body, nodes: [], wide: false }); continue; }
      const [node, wide] = blockOf(unkeyed(b));
      if (last) {
        last.nodes.push(node);
        last.wide = last.wide || wide;
      } else out.lead.push(node);
      // Component rows (ref, key, value, …) label the schematic.
      if (b.kind === 'table') for (const c of b.body.rows) if (/_(ohm|f)$/.test(c[1])) out.rows[c[1]] = c;
    }
    return out;
  };

  // ---- Drawings for paper ----------------------------------------------------------
  const ratio = () => K * Math.max(1, window.devicePixelRatio || 1);
  // A drawing as an image: what prints the same everywhere (a canvas may print as vectors).
  const image = (canvas, alt) => el('img', { src: canvas.toDataURL('image/png'), alt });

  // The stage's schematic (HR.schematic) at print resolution in one ink, with each fitted
  // component's reference and value (from the sheet's table) where the Stage panel puts them.
  const schematic = (doc, rows) => {
    const canvas = el('canvas');
    const stage = doc.stage || {};
    const describe = (key) => {
      const v = stage[key];
      if (v === undefined || v === null || v === '' || !rows[key]) return null;
      const p = HR.call('parseValue', String(v), key.endsWith('_ohm') ? 'Ω' : 'F', '');
      return { text: `${rows[key][0]} ${rows[key][2]}`, short: p.ok !== undefined && p.ok.value === 0 };
    };
    const anchors = HR.schematic.draw(canvas, describe, Number((doc.part || {}).stages) || 1, ratio());
    const ctx = canvas.getContext('2d');
    ctx.save();
    ctx.globalCompositeOperation = 'source-in'; // the theme's ink, whatever the theme, made the paper's
    ctx.fillStyle = INK;
    ctx.fillRect(0, 0, canvas.width, canvas.height);
    ctx.restore();
    ctx.font = '13px sans-serif';
    ctx.textAlign = 'center';
    ctx.textBaseline = 'middle';
    for (const a of anchors) {
      if (!a.text || (describe(a.key) || {}).short) continue;
      const w = ctx.measureText(a.text).width + 8;
      ctx.fillStyle = '#fff';
      ctx.fillRect(a.x - w / 2, a.y - 9, w, 18);
      ctx.strokeStyle = GRID;
      ctx.strokeRect(a.x - w / 2, a.y - 9, w, 18);
      ctx.fillStyle = INK;
      ctx.fillText(a.text, a.x, a.y);
    }
    return image(trimmed(canvas), 'Schematic of the stage with its component values');
  };
  // The canvas without its blank rows above and below the drawing (a few pixels
  // kept): the schematic leaves room for labels a stage may not have, which on
  // paper is height the sheet needs.
  const trimmed = (canvas) => {
    const { width, height } = canvas;
    const data = canvas.getContext('2d').getImageData(0, 0, width, height).data;
    const inked = (y) => {
      for (let x = 0; x < width; x += 1) if (data[(y * width + x) * 4 + 3] > 0) return true;
      return false;
    };
    let top = 0;
    while (top < height && !inked(top)) top += 1;
    let bottom = height - 1;
    while (bottom > top && !inked(bottom)) bottom -= 1;
    const keep = 4 * ratio();
    const [y0, y1] = [Math.max(0, top - keep), Math.min(height, bottom + 1 + keep)];
    if (y1 - y0 >= height || y1 <= y0) return canvas;
    const out = el('canvas');
    [out.width, out.height] = [width, y1 - y0];
    out.getContext('2d').drawImage(canvas, 0, -y0);
    return out;
  };

  // A Bode-style plot of two curves against frequency (log), dB on the left and degrees
  // on the right, with dashed marks [x, label] and reference levels [y, scale, label].
  // uPlot draws it once, synchronously, at K times the size, for an image. No label
  // lies over another or over a curve: the marks' labels stand in a strip above the
  // plot, a row each where they would meet (a mark's line crossing no label), and a
  // level's label takes the first place along its line (its ends first), above or below it, that no curve
  // or mark crosses; each is haloed in white besides.
  const decade = (v) => v > 0 && Math.abs(Math.log10(v) - Math.round(Math.log10(v))) < 1e-9;
  // The decimals a tick step needs (0.5 → 1, 0.25 → 2, 10 → 0).
  const decimalsOf = (step) => {
    let d = 0;
    while (d < 3 && Math.abs(step * 10 ** d - Math.round(step * 10 ** d)) > 1e-6 * step * 10 ** d) d += 1;
    return d;
  };
  const ROW = 13; // a mark label's row, in CSS pixels before K
  const bode = (title, f, [a, b], marks, levels) => {
    const px = (n) => `${n * K}px`;
    const font = `${px(11)} sans-serif`;
    const axis = (scale, label, side) => ({ scale, label, side, stroke: INK, font, labelFont: `bold ${font}`, size: (side === 2 ? 24 : 50) * K, gap: 3 * K,
      labelSize: 18 * K, grid: { show: side !== 1, stroke: GRID, width: K }, ticks: { stroke: GRID, width: K, size: 4 * K },
      values: scale === 'x' ? (u, ticks) => ticks.map((v) => (decade(v) ? HR.fmt(v, '', 1) : ''))
        : (u, ticks, i, space, step) => ticks.map((v) => HR.fixed(v, decimalsOf(step))) });
    const halo = (c, text, x, y) => {
      c.save();
      c.setLineDash([]);
      c.lineWidth = 3 * K * devicePixelRatio;
      c.lineJoin = 'round';
      c.strokeStyle = '#fff';
      c.strokeText(text, x, y);
      c.restore();
      c.fillText(text, x, y);
    };
    const line = (c, colour, x0, y0, x1, y1) => {
      c.save();
      c.strokeStyle = colour;
      c.lineWidth = K * devicePixelRatio;
      c.setLineDash([5 * K * devicePixelRatio, 4 * K * devicePixelRatio]);
      c.beginPath(); c.moveTo(x0, y0); c.lineTo(x1, y1); c.stroke();
      c.restore();
    };
    // One drawing with `rows` rows of mark labels above the plot; → how many it needed.
    const make = (rows) => {
      let canvas = null;
      let needed = 0;
      const labels = []; // {text, x0, y0, x1, y1, clear} in canvas pixels, for the tests
      let plot = null;
      const draw = (u) => {
        labels.length = 0;
        const c = u.ctx;
        const d = devicePixelRatio;
        const { left, top, width, height } = u.bbox;
        c.save();
        c.font = `${11 * K * d}px sans-serif`;
        c.textBaseline = 'alphabetic';
        const pad = 3 * K * d;
        const row = ROW * K * d;
        // Marks, right to left, each at the lowest row where its label meets no label
        // and its line (down through the rows below) crosses none; beside its line on
        // the right, or on the left where the plot ends.
        const shown = marks.filter(([x]) => HR.known(x) && x >= u.scales.x.min && x <= u.scales.x.max)
          .map(([x, text]) => ({ p: u.valToPos(x, 'x', true), text, w: c.measureText(text).width }))
          .sort((m, n) => n.p - m.p);
        const placed = [];
        for (const m of shown) {
          let best = null;
          for (let r = 0; r <= shown.length && !best; r += 1) {
            for (const side of [1, -1]) {
              const x0 = side > 0 ? m.p + pad : m.p - pad - m.w;
              const box = { x0: x0 - pad, x1: x0 + m.w + pad, r };
              if (box.x0 < left - pad || box.x1 > left + width + pad) continue; // clear of the axes' numbers
              const clash = placed.some((q) => (q.r === r && box.x0 < q.x1 && q.x0 < box.x1)
                || (q.r > r && q.p > box.x0 && q.p < box.x1) || (q.r < r && m.p > q.x0 && m.p < q.x1));
              if (!clash) { best = { ...box, p: m.p, text: m.text, lx: x0 }; break; }
            }
          }
          // No row is clear (a line must cross a label): the row above all, right of the line.
          placed.push(best || { x0: m.p, x1: m.p + m.w + 2 * pad, r: placed.length, p: m.p, text: m.text, lx: m.p + pad });
        }
        needed = placed.reduce((n, q) => Math.max(n, q.r + 1), 0);
        plot = { left, top, width, height };
        const h = 11 * K * d;
        c.fillStyle = C3;
        for (const q of placed) {
          const base = top - q.r * row - 3 * K * d; // the label's baseline, in its row
          line(c, C3, q.p, base + 2 * K * d, q.p, top + height);
          halo(c, q.text, q.lx, base);
          labels.push({ text: q.text, x0: q.lx, x1: q.lx + c.measureText(q.text).width, y0: base - h, y1: base, clear: true });
        }
        // Levels: the label at the first place along the line (its ends first), above or
        // below it, that no curve or mark crosses (else above at the right).
        const points = [];
        for (const [ys, scale] of [[a.y, 'l'], [b.y, 'r']]) {
          for (let i = 0; i < f.length; i += 1) {
            if (HR.known(ys[i]) && HR.known(f[i])) points.push([u.valToPos(f[i], 'x', true), u.valToPos(ys[i], scale, true)]);
          }
        }
        for (const [y, scale, text] of levels) {
          if (y < u.scales[scale].min || y > u.scales[scale].max) continue;
          const p = u.valToPos(y, scale, true);
          line(c, INK, left, p, left + width, p);
          const w = c.measureText(text).width;
          // The ends first, then places between them, above the line before below it.
          const along = [1, 0, 0.75, 0.25, 0.5, 0.875, 0.125, 0.625, 0.375].map((t) => left + pad + t * (width - 2 * pad - w));
          const spots = [p - pad, p + pad + h].flatMap((base) => along.map((x) => [x, base]));
          const spot = spots.find(([x, base]) => {
            const box = { x0: x - pad, x1: x + w + pad, y0: base - h - pad, y1: base + pad };
            if (box.y0 < top || box.y1 > top + height) return false;
            return !points.some(([px, py]) => px > box.x0 && px < box.x1 && py > box.y0 && py < box.y1)
              && !placed.some((q) => q.p > box.x0 && q.p < box.x1);
          });
          const [x, base] = spot || spots[0];
          c.fillStyle = INK;
          halo(c, text, x, base);
          labels.push({ text, x0: x, x1: x + w, y0: base - h, y1: base, clear: Boolean(spot) });
        }
        c.restore();
      };
      const series = (s, scale, colour, dash) => ({ label: s.label, scale, stroke: colour, width: 1.6 * K, dash, points: { show: false } });
      new uPlot({
        width: 340 * K, height: (185 + ROW * rows) * K, legend: { show: false }, cursor: { show: false }, select: { show: false },
        padding: [(8 + ROW * rows) * K, null, null, null],
        scales: { x: { time: false, distr: 3, log: 10 }, l: {}, r: {} },
        axes: [axis('x', 'Frequency (Hz)', 2), axis('l', `${a.label} (dB)`, 3), axis('r', `${b.label} (°)`, 1)],
        series: [{}, series(a, 'l', C1), series(b, 'r', C2, [6 * K, 3 * K])],
        hooks: { draw: [draw] },
      }, [f, a.y, b.y], (u, init) => { u.batch(init); canvas = u.ctx.canvas; u.destroy(); });
      return { canvas, needed, labels, plot };
    };
    // One row is kept for the labels; a drawing that needs more is made again with them.
    let drawn = make(1);
    if (drawn.needed > 1) drawn = make(drawn.needed);
    const key = (s, colour, dash) => el('span', { class: `key${dash ? ' dash' : ''}`, style: `border-color:${colour}` }, s.label);
    const img = image(drawn.canvas, title);
    img.dataset.labels = JSON.stringify({ plot: drawn.plot, labels: drawn.labels });
    return el('figure', {}, el('figcaption', {}, title, ' ', key(a, C1), ' ', key(b, C2, true)), img);
  };

  // The two plots, from the sweeps computed in the background with the sheet
  // (`made.curves`); a sweep the core refused is left out.
  const plots = (curves) => {
    const out = [];
    const r = curves.response || {};
    if (r.ok) {
      const d = r.ok.design;
      out.push(bode('Voltage gain and phase', r.ok.f_hz, [{ label: 'Av', y: r.ok.gain_db }, { label: 'phase', y: r.ok.phase_unwrapped_deg }],
        [[r.ok.f_design_hz, 'f_design'], [d.f_low_hz, 'f_low'], [d.f_high_hz, 'f_high']], []));
    }
    const l = curves.loop || {};
    if (l.ok) {
      const s = l.ok.summary;
      out.push(bode('Loop gain T', l.ok.f_hz, [{ label: '|T|', y: l.ok.t_db }, { label: '∠T', y: l.ok.t_phase_deg }],
        [[s.crossover_hz, 'crossover'], [s.phase_crossover_hz, '−180°']], [[0, 'l', '|T| = 1'], [-180, 'r', '∠T = −180°']]));
    }
    return out;
  };

  // ---- The sheet -------------------------------------------------------------------
  // A long table of figures (two columns) across the page, as two tables side by side.
  const halves = (t) => {
    const rows = t.tagName === 'TABLE' ? [...t.tBodies[0].rows] : [];
    if (rows.length < 7 || t.tHead.rows[0].cells.length !== 2) return t;
    const n = Math.ceil(rows.length / 2);
    const b = t.cloneNode(true);
    rows.slice(n).forEach((r) => r.remove());
    [...b.tBodies[0].rows].slice(0, n).forEach((r) => r.remove());
    return el('div', { class: 'halves' }, t, b);
  };
  // A wide section of two narrow tables, each under its caption (the schematic's
  // components to build, and the source and load the figures assume): the two side
  // by side, the second with what follows it.
  const sideBySide = (nodes) => {
    const tables = nodes.map((n, i) => [n, i]).filter(([n]) => n.tagName === 'TABLE');
    if (tables.length !== 2 || tables.some(([t]) => t.tHead.rows[0].cells.length > 4)) return nodes;
    const cut = tables[1][1] - (nodes[tables[1][1] - 1].tagName === 'P' ? 1 : 0);
    if (cut <= tables[0][1]) return nodes;
    return [el('div', { class: 'halves' }, el('div', {}, nodes.slice(0, cut)), el('div', {}, nodes.slice(cut)))];
  };
  const today = () => {
    const d = new Date();
    const two = (n) => String(n).padStart(2, '0');
    return `${d.getFullYear()}-${two(d.getMonth() + 1)}-${two(d.getDate())}`;
  };

  // The design the sheet is of: the draft, or the last good one while the draft has a
  // bad value (said on the sheet). `error`: the core's check of the draft.
  const sourceOf = (text, error) => {
    const good = HR.design.lastGood();
    if (!error || !good) return { text, problem: error };
    return { text: good, problem: error, older: true };
  };
  // The draft's check, remembered (a pass is memoised by HR.check; a refusal is not):
  // made after each change, so that `beforeprint` asks the core nothing.
  let checked = { text: null, error: null };
  const recheck = () => {
    const text = HR.design.text();
    if (checked.text !== text) checked = { text, error: HR.check(text).error || null };
    return checked;
  };
  const source = () => {
    const c = recheck();
    return sourceOf(c.text, c.error);
  };

  // The link as printed. A link of a thousand characters and more is no line to
  // read: the footer shows what fits on one line (CSS cuts it with an ellipsis, to
  // whatever width the paper gives) and note 1 holds it whole, broken anywhere so it
  // prints. A page opened from disk has a file:// address, which spells the user's
  // folders: a sheet that is printed, or shared as a PDF, must not carry them. So
  // from file:// only the part after the page's file name is printed — the
  // fragment, which holds the panel and the whole design, and opens it in any copy
  // of the page — with how to use it, and nothing is made a link (a PDF keeps a
  // link's whole address, folders and all). From http(s) the address is public:
  // the whole link, a link on paper too.
  const printedLink = (url) => {
    if (!/^file:/i.test(url)) return { text: url, href: url };
    const at = url.indexOf('#');
    return { text: at < 0 ? '' : url.slice(at), href: null };
  };
  const footerLink = (url, linkText) => {
    if (!url) return [el('p', { class: 'link' }, `Link to this design: ${linkText}`)];
    const { text, href } = printedLink(url);
    const shown = (cls) => (href ? el('a', { class: cls, href }, text) : el('span', { class: cls }, text));
    return [
      el('p', { class: 'link' }, 'Link to this design (note 1): ', shown('short')),
      el('p', { class: 'note' }, el('sup', {}, '1'), href ? ' The whole link, which opens this design: '
        : ' The end of the link, which holds the design (the page was opened from disk, and its folders are left out): open your copy of the page and add this after its file name in the address: ', shown('full')),
    ];
  };

  // ---- The sheet of a prepared design, drawn once -------------------------------
  // design text → {ok: the core's sheet page, curves: {response, loop}} | {error}
  const sheets = new Map();
  // The drawn sheet of one prepared design: {text, title, sub, error, lead, parts}.
  // Drawing formats through the core (axes, values), calls bounded well under a
  // frame, so it is done when the sheet arrives (in an idle moment), not at print.
  let body = null;
  const draw = (text) => {
    if (body && body.text === text) return body;
    const made = sheets.get(text);
    const sheet = made.ok ? read(made.ok) : { title: '', sub: '', lead: [], sections: [], rows: {} };
    const doc = JSON.parse(text);
    const parts = [];
    let flow = null;
    let drawn = false;
    const drawings = () => { drawn = true; return el('div', { class: 'plots' }, plots(made.curves || {})); };
    for (const s of sheet.sections) {
      const first = !parts.length && Object.keys(sheet.rows).length;
      const sec = el('section', {}, el('h2', {}, s.head), first ? schematic(doc, sheet.rows) : null, ...(s.wide ? sideBySide(s.nodes.map(halves)) : s.nodes));
      if (s.wide) {
        if (flow && !drawn) parts.push(drawings());
        flow = null;
        parts.push(sec);
      } else {
        if (!flow) parts.push((flow = el('div', { class: 'flow' })));
        flow.append(sec);
      }
    }
    if (made.ok && !drawn) parts.push(drawings());
    body = { text, title: sheet.title, sub: sheet.sub, error: made.error || null, lead: sheet.lead, parts };
    return body;
  };

  // The title a sheet of the draft has, as the core gives it (`Untitled design` for none).
  const titleOf = (text) => {
    try {
      const t = JSON.parse(text).title;
      return typeof t === 'string' && t.trim() ? t : 'Untitled design';
    } catch (e) {
      return 'Untitled design';
    }
  };

  // Puts the sheet on #sheet: the drawn sheet of the design `from` ('current'), or,
  // when that is not prepared, the last one drawn marked as of an earlier design
  // ('older'), or a sheet that says it is not ready ('none'). No core call: what it
  // says of a bad value was checked after the change, and the body is drawn.
  let shownFor = null;
  const compose = ({ text, problem, older }, state) => {
    const url = state === 'current' && link.text === text && link.url;
    const linkText = url || (state !== 'current' ? 'none: this sheet is not of the design as it is now'
      : link.text === text ? `none: ${link.why}` : older ? 'none while the design on the page has a bad value' : 'not made yet: print again');
    const b = state === 'none' ? null : body;
    const key = JSON.stringify([text, state, b && b.text, linkText, problem || null]);
    if (shownFor === key && node) return;
    if (!node) document.body.append((node = el('div', { class: 'sheet', id: 'sheet' })));
    const warn = (t) => el('p', { class: 'warn' }, t);
    const again = 'Print again in a moment, or use Print sheet (in the Design bar), which waits for it.';
    const bad = problem ? HR.words(problem) : '';
    const notes = [];
    if (state === 'current' && problem) {
      notes.push(warn(older ? `The design on the page has a bad value (${bad}); this sheet is of the last design without one.`
        : `This design has a bad value (${bad}).`));
    }
    if (state === 'older') {
      notes.push(warn(`Not the design as it is now: this sheet is of an earlier version of it${problem ? ` (the design on the page has a bad value: ${bad})` : ''}. `
        + `The sheet is prepared in the background after each change, and the one for the latest change was not ready when printing began. ${again}`));
    }
    if (state === 'none') {
      notes.push(warn('The design sheet is not ready yet: it is prepared in the background (every analysis, the large-signal one too) '
        + `and was still being made when printing began. ${again}`));
    }
    if (b && b.error) notes.push(warn(`The sheet could not be made: ${HR.words(b.error)}.`));
    const title = state === 'current' && b.title ? b.title : titleOf(HR.design.text());
    node.dataset.state = state;
    node.replaceChildren(...[
      el('header', {}, el('h1', {}, title), el('p', { class: 'sub' }, (b && b.sub) || `Design sheet, Halfrail ${HR.version}`)),
      ...notes,
      ...(b ? [...b.lead, ...b.parts] : []),
      el('footer', {}, el('p', {}, `Halfrail ${HR.version} · printed ${today()}`), ...footerLink(url, linkText))].filter(Boolean));
    shownFor = key;
  };

  // The link of the design as it is now, kept for a sheet that cannot wait for it.
  const refreshLink = () => {
    const text = HR.design.text();
    let why = '';
    return HR.documents.link('', (said) => { why = said; }).then((url) => {
      if (HR.design.text() === text) link = { text, url, why };
    });
  };
  let linkTimer = null; // a pause after the last edit, as the panels' background runs wait
  HR.design.onChange(() => { clearTimeout(linkTimer); linkTimer = setTimeout(refreshLink, 300); });

  // ---- Preparing the sheet in the background ----------------------------------
  // The sheet, then the two sweeps its plots draw (the loop's can take long too), one
  // after another in the lane `sheet`; a sweep the core refuses is left out. A newer
  // design supersedes a run by ending its worker: the sheet is every analysis (a
  // second or two of a core), which a stale run would go on spending while the
  // panels compute; runs start only after a pause, so a worker a pause is cheap. One
  // run at a time; a run a print waits for is not superseded by the background's.
  let running = null; // {text, promise, cancel(), forPrint}
  const ENTRIES = [['sheetPage', null], ['responseReport', 'response'], ['loopReport', 'loop']];
  const made = (text, forPrint = false) => {
    if (sheets.has(text)) return Promise.resolve(sheets.get(text));
    if (running && running.text === text) {
      running.forPrint = running.forPrint || forPrint;
      return running.promise;
    }
    if (running && running.forPrint && !forPrint) return Promise.resolve(null);
    if (running) running.cancel();
    let job = null;
    let cancelled = false;
    const mine = { text, forPrint, cancel() { cancelled = true; if (job) job.cancel(); } };
    mine.promise = (async () => {
      const curves = {};
      let r = null;
      for (const [entry, key] of ENTRIES) {
        job = HR.background.run(entry, [text], { lane: 'sheet' });
        const got = await job.promise;
        job = null;
        if (cancelled || got.cancelled) return null;
        if (key) curves[key] = got; else r = got;
        if (!key && r.error) break;
      }
      const result = r.error ? { error: r.error } : { ok: r.ok, curves };
      sheets.set(text, result);
      while (sheets.size > 4) sheets.delete(sheets.keys().next().value);
      return result;
    })();
    running = mine;
    mine.promise.then(() => {
      if (running !== mine) return;
      running = null;
      // The design moved on while this one was made (for a print): prepare it too.
      if (!sheets.has(sourceOf(HR.design.text(), checked.text === HR.design.text() ? checked.error : null).text)) schedule();
    });
    return mine.promise;
  };

  // Draws a prepared sheet when the page is next idle, if it is still the design's.
  const idle = window.requestIdleCallback ? (f) => window.requestIdleCallback(f, { timeout: 500 }) : (f) => setTimeout(f, 0);
  const drawSoon = (text) => idle(() => {
    if (sheets.has(text) && source().text === text) draw(text);
  });

  // A pause after the last change, as the panels' runs wait (longer: the sheet is
  // every analysis, and is wanted only at print).
  const PAUSE = 800;
  let timer = null;
  const prepare = () => {
    timer = null;
    if (!document.documentElement.dataset.ready) return;
    const from = source();
    made(from.text).then((m) => { if (m) drawSoon(from.text); });
  };
  const schedule = (delay = PAUSE) => {
    clearTimeout(timer);
    timer = setTimeout(prepare, delay);
  };
  let queued = false;
  HR.design.onChange(() => {
    if (!document.documentElement.dataset.ready) return;
    schedule();
    // The draft's check after the burst of edits (one checkDocument, memoised for
    // the followers that check it too).
    if (queued) return;
    queued = true;
    queueMicrotask(() => { queued = false; recheck(); });
  });
  new MutationObserver((m, o) => {
    if (document.documentElement.dataset.ready) { o.disconnect(); refreshLink(); schedule(); }
  }).observe(document.documentElement, { attributes: true, attributeFilter: ['data-ready'] });

  // Print sheet: the sheet prepared in the background (waited for if need be; the
  // page keeps answering), then the sheet, then the browser's print dialog.
  const print = async () => {
    const from = source();
    if (!sheets.has(from.text)) {
      HR.setStatus('Preparing the design sheet (every analysis, the large-signal one too)…');
      if (!(await made(from.text, true))) return;
    }
    if (link.text !== HR.design.text()) await refreshLink();
    draw(from.text);
    compose(from, 'current');
    await Promise.all([...node.querySelectorAll('img')].map((i) => i.decode().catch(() => {})));
    HR.setStatus('Design sheet ready: printing it, or saving it as PDF from the print dialog.');
    node.dataset.printed = String(Number(node.dataset.printed || 0) + 1);
    window.print();
  };

  // Ctrl+P (and page.pdf): what is prepared, at once. The design's check was made
  // after the last change (an edit in this very task is not checked yet: its sheet
  // is then taken as not prepared, which it cannot be).
  window.addEventListener('beforeprint', () => {
    if (!document.documentElement.dataset.ready) return;
    const draft = HR.design.text();
    const from = checked.text === draft ? sourceOf(draft, checked.error) : { text: draft, problem: null };
    if (sheets.has(from.text)) {
      draw(from.text); // already drawn, but for a print in the moment before the idle one
      compose(from, 'current');
      return;
    }
    compose(from, body ? 'older' : 'none');
    schedule(0);
  });
  // While printing, the page's title is what a PDF of the sheet is saved as: named from
  // the design's title as the other files are (HR.documents.named), or as before
  // without one.
  let pageTitle = null;
  window.addEventListener('beforeprint', () => {
    if (pageTitle !== null || !HR.documents.stem()) return;
    pageTitle = document.title;
    document.title = `${HR.documents.stem()}-sheet`;
  });
  window.addEventListener('afterprint', () => {
    if (pageTitle !== null) document.title = pageTitle;
    pageTitle = null;
  });

  // Whether the kept link is of the design as it is now (a test waits for it).
  const linkIsCurrent = () => link.text === HR.design.text();
  // Whether Ctrl+P now prints the sheet of the design as it is, with its link: the
  // sheet prepared and drawn (the tests wait for this state before printing).
  const ready = () => {
    const draft = HR.design.text();
    return checked.text === draft && Boolean(body) && body.text === sourceOf(draft, checked.error).text && linkIsCurrent();
  };
  // What the background is doing about the sheet: 'preparing' (a run in the lane),
  // 'waiting' (the pause after a change), else 'idle'.
  const state = () => (running ? 'preparing' : timer ? 'waiting' : 'idle');

  return { print, linkIsCurrent, ready, state };
})();
