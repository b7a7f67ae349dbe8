'use strict';
// The page inside another page. In a frame it always posts its height to the host,
// so the host can size the frame to it. In embed mode (`#…&embed`) the chrome is
// compact: a small header, the rail as one row, the cautions as one line that opens
// to the whole text. `embed=view` is read only: every input of the panels is
// read-only or disabled and the controls that edit the design are hidden (HR.design
// refuses changes too, locked by HR.documents).

HR.embed = (() => {
  const { el } = HR.ui;
  // The panels' buttons that only show, compute or export, by their text: in a
  // read-only view every other button is hidden, so a button added later that edits
  // the design is hidden without being listed here (the design refuses it anyway).
  const VIEWS = /^(PNG|Save as CSV|Compute now|Cancel|Compute the reference too|Design|Fit the part|Near −1)$/;

  const freeze = (root) => {
    for (const n of root.querySelectorAll('input, select, textarea, button')) {
      if (n.tagName === 'BUTTON') {
        if (n.classList.contains('value')) n.disabled = true;
        else if (!VIEWS.test(n.textContent.trim())) n.hidden = true;
      } else if (n.tagName === 'SELECT' || /^(checkbox|radio|file|range|color)$/.test(n.type)) n.disabled = true;
      else n.readOnly = true;
    }
  };

  if (window.parent !== window) {
    document.documentElement.classList.add('framed');
    // Only the height is posted, nothing of the design, so any host may read it ('*').
    let last = 0;
    new ResizeObserver(() => {
      const height = Math.ceil(document.body.getBoundingClientRect().height);
      if (height !== last) window.parent.postMessage({ type: 'halfrail-height', height: (last = height) }, '*');
    }).observe(document.body);
  }

  return {
    start(view) {
      const root = document.documentElement;
      root.classList.add('embed');
      const footer = document.getElementById('cautions');
      const more = el('button', { type: 'button', class: 'small', 'aria-expanded': 'false', 'aria-controls': 'cautions', onclick: () => {
        more.setAttribute('aria-expanded', String(footer.classList.toggle('open')));
      } }, 'All cautions');
      footer.prepend(el('p', { class: 'brief' }, el('strong', {}, 'Before you build: '),
        'check the part’s ratings and dissipation; every figure is a model estimate.', more));
      if (!view) return;
      root.classList.add('view');
      const main = document.getElementById('main');
      new MutationObserver(() => freeze(main)).observe(main, { childList: true, subtree: true });
    },
  };
})();
