'use strict';
// A figure in the complex plane. uPlot draws curves of one sorted x; a Nyquist plot or
// a pole map is curves and points in the plane, so it gets a canvas of its own, with
// the same manners as HR.plot's figures (whose wheel, keys, PNG button and label halo
// it shares): a hover read-out, Ctrl/Alt+wheel or +/− to zoom, the arrow keys to pan,
// double-click or 0 to reset, PNG export. What it shows is a renderer's (a `spec`).

HR.plane = (() => {
  const { el } = HR.ui;
  const css = (name) => HR.plot.css(name);

  // create(container, spec) → {node, setData(data), setView([x0, x1, y0, y1]), reset()}
  //   spec: {title, file, height, square, home(data) → [x0, x1, y0, y1],
  //          draw(ctx, P, data), axes(ctx, P, data), pick(mx, my, P, data) → text or null,
  //          idle(data) → the read-out when nothing is under the cursor,
  //          extra(figure) → [buttons] for the caption, given the figure they act on}
  // `data.ref` (the reference design's, or absent) is counted in `data-reference`.
  // Each new data resets the view to `home`, as a new result resets uPlot's ranges.
  // P, the drawing's frame: the canvas's w × h (CSS pixels), the plot `box`, the view
  // x0…y1, and x(u), y(v) to pixels and ux(px), uy(py) back.
  const create = (container, spec) => {
    const figure = {};
    const canvas = el('canvas', { role: 'img', 'aria-label': spec.title });
    const readout = el('p', { class: 'plane-readout' }, '\u00a0');
    const png = HR.plot.pngButton(spec.title, spec.file, () => canvas);
    const wrap = el('figure', { class: 'plot plane', tabindex: 0, 'aria-label': `${spec.title}. Arrow keys pan, + and − zoom, 0 resets.` },
      el('figcaption', {}, spec.title, ' ', ...(spec.extra ? spec.extra(figure) : []), png), canvas, readout);
    container.append(wrap);
    const M = { l: 58, r: 14, t: 10, b: 42 };
    let data = null;
    let view = null;
    let P = null;
    const idle = () => { readout.textContent = data ? spec.idle(data) : '\u00a0'; };

    // The view fitted to the box; with `square`, one scale on both axes.
    const layout = () => {
      const w = Math.max(300, wrap.clientWidth || 480);
      const h = spec.height || 300;
      const box = { l: M.l, t: M.t, w: w - M.l - M.r, h: h - M.t - M.b };
      let [x0, x1, y0, y1] = view;
      if (spec.square) {
        const s = Math.min(box.w / (x1 - x0), box.h / (y1 - y0));
        const cx = (x0 + x1) / 2;
        const cy = (y0 + y1) / 2;
        [x0, x1, y0, y1] = [cx - box.w / s / 2, cx + box.w / s / 2, cy - box.h / s / 2, cy + box.h / s / 2];
      }
      return {
        w, h, box, x0, x1, y0, y1,
        x: (u) => box.l + ((u - x0) / (x1 - x0)) * box.w,
        y: (v) => box.t + ((y1 - v) / (y1 - y0)) * box.h,
        ux: (px) => x0 + ((px - box.l) / box.w) * (x1 - x0),
        uy: (py) => y1 - ((py - box.t) / box.h) * (y1 - y0),
      };
    };

    const draw = () => {
      if (!data) return;
      P = layout();
      const dpr = window.devicePixelRatio || 1;
      canvas.width = Math.round(P.w * dpr);
      canvas.height = Math.round(P.h * dpr);
      canvas.style.width = `${P.w}px`;
      canvas.style.height = `${P.h}px`;
      const ctx = canvas.getContext('2d');
      ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
      ctx.fillStyle = css('--surface');
      ctx.fillRect(0, 0, P.w, P.h);
      ctx.font = '12px sans-serif';
      ctx.save();
      ctx.beginPath();
      ctx.rect(P.box.l, P.box.t, P.box.w, P.box.h);
      ctx.clip();
      spec.draw(ctx, P, data);
      ctx.restore();
      ctx.strokeStyle = css('--line');
      ctx.lineWidth = 1;
      ctx.strokeRect(P.box.l + 0.5, P.box.t + 0.5, P.box.w, P.box.h);
      if (spec.axes) spec.axes(ctx, P, data);
    };

    const setView = (v) => { view = v; draw(); };
    const reset = () => { if (data) setView(spec.home(data)); };
    const current = () => [P.x0, P.x1, P.y0, P.y1];
    const zoom = (factor, cx, cy) => {
      const [x0, x1, y0, y1] = current();
      setView([cx - (cx - x0) * factor, cx + (x1 - cx) * factor, cy - (cy - y0) * factor, cy + (y1 - cy) * factor]);
    };
    const pan = (fx, fy) => {
      const [x0, x1, y0, y1] = current();
      const dx = (x1 - x0) * fx;
      const dy = (y1 - y0) * fy;
      setView([x0 + dx, x1 + dx, y0 + dy, y1 + dy]);
    };
    const local = (e) => { const b = canvas.getBoundingClientRect(); return [e.clientX - b.left, e.clientY - b.top]; };

    canvas.addEventListener('mousemove', (e) => {
      if (!P) return;
      const text = spec.pick(...local(e), P, data);
      if (text) readout.textContent = text; else idle();
    });
    canvas.addEventListener('mouseleave', idle);
    canvas.addEventListener('dblclick', reset);
    // The wheel zooms about the point under the cursor; the keys about the middle.
    HR.plot.controls(wrap, {
      ready: () => Boolean(P),
      zoom: (factor, e) => {
        if (!e) { zoom(factor, (P.x0 + P.x1) / 2, (P.y0 + P.y1) / 2); return; }
        const [mx, my] = local(e);
        zoom(factor, P.ux(mx), P.uy(my));
      },
      pan,
      reset,
    }, { vertical: true, ownKeys: true });
    let width = 0;
    new ResizeObserver(() => { if (wrap.clientWidth !== width) { width = wrap.clientWidth; draw(); } }).observe(wrap);
    return Object.assign(figure, {
      node: wrap,
      setData(d) {
        data = d;
        wrap.dataset.reference = d.ref ? String(d.ref.length) : '';
        view = spec.home(d);
        draw();
        idle();
      },
      setView,
      reset,
    });
  };

  // Draws text with a halo of the surface colour, so it reads over grid and curves;
  // with `P`, moved sideways to stay inside the plot box.
  const label = (ctx, text, x, y, colour, align = 'left', P = null) => {
    ctx.save();
    if (P) {
      const w = ctx.measureText(text).width;
      const left = align === 'right' ? x - w : x;
      x += Math.max(P.box.l + 3 - left, Math.min(0, P.box.l + P.box.w - 3 - (left + w)));
    }
    ctx.textAlign = align;
    ctx.fillStyle = colour;
    HR.plot.halo(ctx, text, x, y, 3);
    ctx.restore();
  };

  // A cross (a pole, the −1 point) at canvas point (x, y).
  const cross = (ctx, x, y, size, colour, width = 2) => {
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.lineWidth = width;
    ctx.beginPath();
    ctx.moveTo(x - size, y - size); ctx.lineTo(x + size, y + size);
    ctx.moveTo(x - size, y + size); ctx.lineTo(x + size, y - size);
    ctx.stroke();
    ctx.restore();
  };

  // Axis labels of a plane: x under the box, y turned along its left side.
  const axisLabels = (ctx, P, xText, yText) => {
    ctx.save();
    ctx.fillStyle = css('--ink');
    ctx.textAlign = 'center';
    ctx.fillText(xText, P.box.l + P.box.w / 2, P.h - 6);
    ctx.translate(14, P.box.t + P.box.h / 2);
    ctx.rotate(-Math.PI / 2);
    ctx.fillText(yText, 0, 0);
    ctx.restore();
  };

  // The index of the point of `points` ([re, im] or null) nearest the pointer at
  // (mx, my) on `P`, within 12 px; -1 when none is: what a `pick` reads out.
  const nearest = (points, P, mx, my) => {
    let best = -1;
    let bestD = 12;
    points.forEach((p, i) => {
      if (!p) return;
      const dist = Math.hypot(P.x(p[0]) - mx, P.y(p[1]) - my);
      if (dist < bestD) { bestD = dist; best = i; }
    });
    return best;
  };

  // Strokes `points` ([re, im], or null for a gap) on `P` in `colour`, `width` px and
  // `dash`; `sign` −1 draws the mirror image (a Nyquist plot's negative frequencies).
  const polyline = (ctx, P, points, { colour, width, dash = [], sign = 1 }) => {
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.lineWidth = width;
    ctx.setLineDash(dash);
    ctx.beginPath();
    let pen = false;
    for (const p of points) {
      if (!p) { pen = false; continue; }
      const [x, y] = [P.x(p[0]), P.y(sign * p[1])];
      if (pen) ctx.lineTo(x, y); else ctx.moveTo(x, y);
      pen = true;
    }
    ctx.stroke();
    ctx.restore();
  };

  return { create, label, cross, ring: HR.plot.ring, axisLabels, nearest, polyline };
})();
