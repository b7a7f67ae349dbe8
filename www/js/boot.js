'use strict';
// The page's first script: unpacks its payload — the app's scripts and the wasm
// module, xz-packed together (xz packs the scripts an eighth smaller than the page's
// own gzip would) and base64'd into <script id="hr-payload"> — leaves the module's
// bytes in `halfrailWasm` for HR.start and runs the scripts. Layout: the scripts'
// UTF-8 length (4 bytes, little-endian), the scripts, the module.
(async () => {
  performance.mark('hr-wasm-start');
  const failed = (e) => {
    const status = document.getElementById('engine-status');
    status.textContent = `This page could not start in this browser (${e && e.message ? e.message : e}).`;
    status.classList.add('problem');
  };
  // An error in the scripts' own first run reaches `error`, not the catch below.
  const thrown = (e) => failed(e.error || e);
  try {
    const text = document.getElementById('hr-payload').textContent.trim();
    const packed = Uint8Array.from(atob(text), (c) => c.charCodeAt(0));
    const stream = new self['xz-decompress'].XzReadableStream(new Blob([packed]).stream());
    const bytes = new Uint8Array(await new Response(stream).arrayBuffer());
    const length = new DataView(bytes.buffer).getUint32(0, true);
    self.halfrailWasm = bytes.subarray(4 + length);
    const app = document.createElement('script');
    app.id = 'hr-app';
    app.textContent = new TextDecoder().decode(bytes.subarray(4, 4 + length));
    window.addEventListener('error', thrown);
    document.body.append(app);
    window.removeEventListener('error', thrown);
  } catch (e) {
    failed(e);
  }
})();
