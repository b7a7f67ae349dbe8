// Reading a PDF the page printed (pdf.js, legacy build for Node): its pages' text
// (NFKC, whitespace made single spaces) and how many images each paints.
import { getDocument, OPS } from 'pdfjs-dist/legacy/build/pdf.mjs';

export async function readPdf(bytes) {
  const doc = await getDocument({ data: new Uint8Array(bytes), isEvalSupported: false }).promise;
  const pages = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i);
    const text = (await page.getTextContent()).items.map((t) => t.str + (t.hasEOL ? ' ' : '')).join('').normalize('NFKC').replace(/\s+/g, ' ');
    const ops = await page.getOperatorList();
    pages.push({ text, images: ops.fnArray.filter((f) => f === OPS.paintImageXObject).length });
  }
  await doc.destroy();
  return { pages, text: pages.map((p) => p.text).join(' '), images: pages.reduce((n, p) => n + p.images, 0) };
}

// NFKC: the PDF's fonts give µ (micro) back as μ (mu), and so on.
export const squash = (s) => s.normalize('NFKC').replace(/\s+/g, ' ').trim();
