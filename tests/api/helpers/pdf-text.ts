import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/**
 * The text of every page of a PDF, read by pdf.js: pages joined by a line break, items by one space, and
 * a word broken at a hyphen at a line end joined again ("high- pressure" reads "high-pressure").
 */
export async function pdfText(bytes: Uint8Array): Promise<{ pages: number; text: string }> {
  const document = await getDocument({ data: new Uint8Array(bytes), isEvalSupported: false, useSystemFonts: false, verbosity: 0 }).promise;
  const pages: string[] = [];
  for (let number = 1; number <= document.numPages; number++) {
    const page = await document.getPage(number);
    const content = await page.getTextContent();
    pages.push(content.items.map((item) => ('str' in item ? item.str : '')).join(' ').replace(/\s+/g, ' ').replace(/(\S)- /g, '$1-'));
  }
  await document.destroy();
  return { pages: document.numPages, text: pages.join('\n') };
}
