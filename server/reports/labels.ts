/**
 * Tag labels: a sheet of stick-on labels (or one label per page for a thermal printer),
 * each with the tag number, board, position designation, kind and a QR code of the
 * tag's short URL. QR encoding is the `qrcode` package's; the modules are drawn as
 * vector squares so they stay sharp at any printer resolution.
 */
import QRCode from "qrcode";
import { labelSheet, labelSlots, tagUrl, type LabelSheetId } from "../../src/domain/label-sheets";
import { COMPONENT_KIND_LABELS, type ComponentKind } from "../../src/domain/vocab";
import type { LabelsQuery } from "../../src/schemas/reports";
import type { Db } from "../db";
import { notFound } from "../errors";
import { INK, line, mm, newDocument, text } from "./pdf-base";
import { boardOnSite, labelRows, sectionOnSite } from "./repository";

export interface LabelItem {
  tagNumber: string;
  boardName: string;
  designation: string;
  kind: ComponentKind;
  siteName: string;
}

/** Tagged components at the chosen positions, in board, section and position order. */
export async function labelItems(
  db: Db,
  siteId: string,
  q: LabelsQuery,
): Promise<{ items: LabelItem[]; untagged: number }> {
  if (q.boardId && !(await boardOnSite(db, siteId, q.boardId))) throw notFound("That board");
  if (q.sectionId && !(await sectionOnSite(db, siteId, q.sectionId))) throw notFound("That section");
  const rows = await labelRows(db, siteId, q);
  const items = rows
    .filter((r) => r.tagNumber)
    .map((r) => ({
      tagNumber: r.tagNumber!,
      boardName: r.boardName,
      designation: r.designation,
      kind: r.kind,
      siteName: r.siteName,
    }));
  return { items, untagged: rows.length - items.length };
}

/** Draws one QR code of `url` as a square of side `size` (pt), quiet zone of 4 modules included (ISO/IEC 18004). */
export function drawQr(doc: PDFKit.PDFDocument, url: string, x: number, y: number, size: number) {
  const qr = QRCode.create(url, { errorCorrectionLevel: "M" });
  const n = qr.modules.size;
  const quiet = 4;
  const cell = size / (n + 2 * quiet);
  doc.save().rect(x, y, size, size).fill("#ffffff");
  doc.fillColor("#000000");
  for (let r = 0; r < n; r++) {
    let c = 0;
    while (c < n) {
      if (!qr.modules.get(r, c)) {
        c++;
        continue;
      }
      const start = c;
      while (c < n && qr.modules.get(r, c)) c++;
      doc.rect(x + (quiet + start) * cell, y + (quiet + r) * cell, (c - start) * cell + 0.01, cell + 0.01);
    }
  }
  doc.fill("#000000").restore();
}

export function renderLabels(
  items: LabelItem[],
  opts: { sheet: LabelSheetId; start: number; copies: number; baseUrl: string; title: string },
) {
  const sheet = labelSheet(opts.sheet);
  const thermal = sheet.cols === 1 && sheet.rows === 1;
  const doc = newDocument({
    size: [mm(sheet.pageWidth), mm(sheet.pageHeight)],
    margin: 0,
    title: opts.title,
    author: "Tideline",
    subject: "Tag labels",
  });
  const list = items.flatMap((it) => Array.from({ length: opts.copies }, () => it));
  const slots = labelSlots(sheet, list.length, thermal ? 1 : opts.start);
  let page = -1;
  list.forEach((it, i) => {
    const s = slots[i];
    while (page < s.page) {
      doc.addPage({ size: [mm(sheet.pageWidth), mm(sheet.pageHeight)], margin: 0 });
      page++;
    }
    drawLabel(doc, it, mm(s.x), mm(s.y), mm(sheet.labelWidth), mm(sheet.labelHeight), opts.baseUrl);
  });
  if (list.length === 0) {
    doc.addPage({ size: [mm(sheet.pageWidth), mm(sheet.pageHeight)], margin: 0 });
    text(doc, "No tagged positions were chosen.", mm(5), mm(5), {
      size: 9,
      color: INK.muted,
      width: mm(sheet.pageWidth - 10),
    });
  }
  return doc;
}

function drawLabel(
  doc: PDFKit.PDFDocument,
  it: LabelItem,
  x: number,
  y: number,
  w: number,
  h: number,
  baseUrl: string,
) {
  const pad = Math.min(mm(1.5), h * 0.06);
  const q = Math.min(h - 2 * pad, w * 0.46);
  drawQr(doc, tagUrl(baseUrl, it.tagNumber), x + pad, y + (h - q) / 2, q);
  const tx = x + pad + q + mm(1);
  const tw = w - (tx - x) - pad;
  const big = Math.min(h * 0.24, 16);
  const small = Math.max(5, Math.min(h * 0.12, 8.5));
  let ty = y + (h - (big + small * 3.9)) / 2;
  line(doc, it.tagNumber, tx, ty, tw, { font: "monoBold", size: big });
  ty += big * 1.1;
  line(doc, `${it.boardName}`, tx, ty, tw, { size: small, font: "bold" });
  ty += small * 1.25;
  line(doc, `Position ${it.designation}`, tx, ty, tw, { font: "mono", size: small });
  ty += small * 1.25;
  line(doc, COMPONENT_KIND_LABELS[it.kind], tx, ty, tw, { size: small, color: INK.muted });
}
