/**
 * Counts finished pages in a PDF as it streams in: pdfkit writes each page's dictionary
 * ("/Type /Page" then a line break) when the page is done, and "/Type /Pages" once for
 * the page tree, which the line break tells apart. Pure; fed chunk by chunk.
 */
const NEEDLE = "/Type /Page\n";

export function pageCounter() {
  let carry = "";
  let pages = 0;
  const decoder = new TextDecoder("latin1");
  return {
    push(chunk: Uint8Array) {
      const s = carry + decoder.decode(chunk, { stream: true });
      let i = s.indexOf(NEEDLE);
      while (i !== -1) {
        pages++;
        i = s.indexOf(NEEDLE, i + NEEDLE.length);
      }
      carry = s.slice(-(NEEDLE.length - 1));
      return pages;
    },
    get pages() {
      return pages;
    },
  };
}
