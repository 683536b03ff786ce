/** The client's page counter over a streamed PDF agrees with poppler's pdfinfo, however the bytes are chunked. */
import { execFile } from "node:child_process";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import PDFDocument from "pdfkit";
import { expect, it } from "vitest";
import { pageCounter } from "../../src/features/reports/pdf-progress";

it("counts every page of a pdfkit PDF fed in odd-sized chunks, and not the page tree", async () => {
  const doc = new PDFDocument({ autoFirstPage: false });
  const parts: Buffer[] = [];
  doc.on("data", (c: Buffer) => parts.push(c));
  const ended = new Promise((r) => doc.on("end", r));
  for (let i = 0; i < 7; i++) doc.addPage().text(`Page ${i + 1} /Type /Pages`);
  doc.end();
  await ended;
  const bytes = Buffer.concat(parts);
  const dir = await mkdtemp(join(tmpdir(), "tideline-pages-"));
  try {
    await writeFile(join(dir, "x.pdf"), bytes);
    const info = (await promisify(execFile)("pdfinfo", [join(dir, "x.pdf")])).stdout;
    const pages = Number(/Pages:\s+(\d+)/.exec(info)![1]);
    for (const size of [1, 7, 11, 4096]) {
      const c = pageCounter();
      for (let i = 0; i < bytes.length; i += size) c.push(new Uint8Array(bytes.subarray(i, i + size)));
      expect(c.pages).toBe(pages);
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
});
