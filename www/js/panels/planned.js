'use strict';
// The panels still to be built: each says plainly what it will hold. No figures
// are shown until the core computes them.

(() => {
  const { el } = HR.ui;
  const PLANNED = [
    ['chain', 'Chain', 'The stage inside a cascade of pads, filters and other amplifiers: gain, noise figure, intercept, compression and the level at every node.'],
  ];
  for (const [id, title, text] of PLANNED) {
    HR.panel({
      id, title, planned: true,
      mount(container) {
        container.append(el('h1', {}, title),
          el('p', { class: 'planned' }, el('strong', {}, 'Not built yet. '), text));
      },
    });
  }
})();
