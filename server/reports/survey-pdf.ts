/**
 * The condition survey report, drawn with pdfkit. It is rendered twice: a dry run with
 * grey boxes where photos go (no photo is read) numbers every page and fills the table
 * of contents, then the real run streams page by page with those numbers. Both runs lay
 * out identical boxes, so the numbers hold.
 */
import { localDate, localMinute } from "../../src/domain/local-time";
import { dryOutSeries } from "../../src/domain/dry-out-series";
import { VERDICT_LABELS, type Verdict } from "../../src/domain/reading-judgement";
import {
  COMPONENT_KIND_LABELS,
  COMPONENT_KIND_SHORT,
  CONTAMINANT_LABELS,
  CUSTODY_LABELS,
  DEFECT_CATEGORY_LABELS,
  DEFECT_SEVERITIES,
  DEFECT_SEVERITY_LABELS,
  DEFECT_STATUS_LABELS,
  DISPOSITIONS,
  DISPOSITION_LABELS,
  EARTHING_LABELS,
  HERITAGE_LABELS,
  HERITAGE_RULE_LABELS,
  INSULATION_STATE_LABELS,
  MECHANISM_LABELS,
  PART_STATUS_LABELS,
  PHOTO_KIND_LABELS,
  WATER_TYPE_LABELS,
  type Contaminant,
  type InsulationState,
  type Mechanism,
} from "../../src/domain/vocab";
import { REPORT_SECTIONS, type ReportSection } from "../../src/schemas/reports";
import { waterLineFromTop } from "../../src/domain/board-geometry";
import { INK, SAFETY_CAUTION, SCOPE_STATEMENT, heightOf, line, text, widthOf } from "./pdf-base";
import { STAGE_STATUS_LABELS, STEP_KIND_LABELS, SUPPLY_LABELS } from "../../src/domain/return-to-service";
import { isOpenDefect, type ReportBoard, type ReportData, type ReportPhoto, type ReportPosition } from "./survey-data";

export interface RenderOptions {
  /** Dry run: lay out only, photos as boxes, numbers unknown. */
  dry: boolean;
  /** Page of each contents entry and the total, from the dry run. */
  plan?: RenderPlan;
  /** The photo's bytes, already downscaled (JPEG); null when it cannot be read. */
  photo?: (p: ReportPhoto) => Promise<Buffer | null>;
  /** Awaited after each position (back-pressure on the response, progress). */
  afterPosition?: (done: number) => Promise<void> | void;
}
export interface RenderPlan {
  pages: Map<string, number>;
  totalPages: number;
}

interface TocEntry {
  key: string;
  title: string;
  level: 0 | 1;
}

const MARGIN = 48;
const HEADER_H = 26;
const PHOTO_W = 118;
const PHOTO_H = 88;

/** Days and times as the report writes them: on the site's own clock (its IANA zone, named on the cover). */
const reportClock = (zone: string) => ({
  date: (d: Date | string | null | undefined) => (d ? localDate(d, zone) : "—"),
  time: (d: Date | string) => localMinute(d, zone),
});
type ReportClock = ReturnType<typeof reportClock>;
const fmtNum = (n: number | null | undefined, unit = "") =>
  n === null || n === undefined ? "—" : `${Number(n.toPrecision(4))}${unit}`;
const sectionsOf = (data: ReportData): ReportSection[] =>
  data.query.sections?.length ? REPORT_SECTIONS.filter((s) => data.query.sections!.includes(s)) : [...REPORT_SECTIONS];

/** Contents entries, known before any page is drawn (same list in both runs). */
export function tocEntries(data: ReportData): TocEntry[] {
  const s = sectionsOf(data);
  const out: TocEntry[] = [];
  if (s.includes("summary")) out.push({ key: "summary", title: "Summary", level: 0 });
  for (const b of data.boards) {
    out.push({ key: `board:${b.id}`, title: `${b.name}`, level: 0 });
    if (s.includes("board")) out.push({ key: `front:${b.id}`, title: "Board front", level: 1 });
    if (s.includes("positions")) {
      const used = new Set(b.positions.map((p) => p.sectionId ?? ""));
      for (const sec of b.sections)
        if (used.has(sec.id)) out.push({ key: `sec:${sec.id}`, title: `Positions: ${sec.name}`, level: 1 });
      if (used.has("")) out.push({ key: `sec:none:${b.id}`, title: "Positions outside any section", level: 1 });
    }
    if (s.includes("dryout")) out.push({ key: `dryout:${b.id}`, title: "Insulation dry-out charts", level: 1 });
    if (s.includes("rts")) out.push({ key: `rts:${b.id}`, title: "Return-to-service record", level: 1 });
    if (s.includes("defects")) out.push({ key: `defects:${b.id}`, title: "Defect register", level: 1 });
  }
  if (s.includes("parts")) out.push({ key: "parts", title: "Parts wanted", level: 0 });
  out.push({ key: "safety", title: "Safety caution and scope of this report", level: 0 });
  return out;
}

export async function renderSurvey(doc: PDFKit.PDFDocument, data: ReportData, o: RenderOptions): Promise<RenderPlan> {
  const sections = sectionsOf(data);
  const t = reportClock(data.site.timeZone);
  const pages = new Map<string, number>();
  let pageNo = 0;
  const scopeName = data.boards.length === 1 && data.query.boardId ? data.boards[0].name : "All boards";
  const total = o.plan ? String(o.plan.totalPages) : "…";

  const pageW = () => doc.page.width;
  const pageH = () => doc.page.height;
  const left = MARGIN;
  const contentW = () => pageW() - 2 * MARGIN;
  const bottom = () => pageH() - MARGIN - 10;

  doc.on("pageAdded", () => {
    pageNo++;
    const m = doc.page.margins;
    const saved = { ...m };
    m.top = 0;
    m.bottom = 0;
    if (pageNo > 1) {
      line(doc, `Condition survey · ${data.site.name} · ${scopeName}`, left, 20, contentW() - 110, {
        size: 8,
        color: INK.muted,
      });
      text(doc, `Report of ${t.date(data.generatedAt)}`, pageW() - MARGIN - 110, 20, {
        size: 8,
        color: INK.muted,
        width: 110,
        align: "right",
        lineBreak: false,
      });
      doc
        .moveTo(left, 32)
        .lineTo(pageW() - MARGIN, 32)
        .lineWidth(0.6)
        .strokeColor(INK.brassBar)
        .stroke();
    }
    const fy = pageH() - 30;
    doc
      .moveTo(left, fy - 6)
      .lineTo(pageW() - MARGIN, fy - 6)
      .lineWidth(0.4)
      .strokeColor(INK.rule)
      .stroke();
    line(doc, "Records observations and readings; certifies nothing. Tideline.", left, fy, contentW() - 110, {
      size: 7.5,
      color: INK.muted,
    });
    text(doc, `Page ${pageNo} of ${total}`, pageW() - MARGIN - 110, fy, {
      size: 7.5,
      color: INK.muted,
      width: 110,
      align: "right",
      lineBreak: false,
    });
    Object.assign(m, saved);
    doc.x = left;
    doc.y = pageNo > 1 ? MARGIN + HEADER_H - 16 : MARGIN;
  });

  const addPage = () => doc.addPage();
  const ensure = (h: number) => {
    if (doc.y + h > bottom()) addPage();
  };
  let topOutline: PDFKit.PDFOutline | null = null;
  const mark = (key: string, title: string, level: 0 | 1) => {
    pages.set(key, pageNo);
    doc.addNamedDestination(key.replace(/[^A-Za-z0-9]/g, "_"));
    if (level === 0) topOutline = doc.outline.addItem(title);
    else (topOutline ?? doc.outline).addItem(title);
  };
  const heading = (key: string, title: string, level: 0 | 1 = 0) => {
    if (level === 0) addPage();
    else ensure(80);
    mark(key, title, level);
    text(doc, title, left, doc.y, { font: "bold", size: level === 0 ? 18 : 13, color: INK.brass, width: contentW() });
    doc.moveDown(0.4);
  };
  const para = (s: string, opts: { size?: number; color?: string; font?: "body" | "bold" | "italic" } = {}) => {
    text(doc, s, left, doc.y, {
      size: opts.size ?? 9.5,
      color: opts.color ?? INK.text,
      font: opts.font ?? "body",
      width: contentW(),
      lineGap: 1.5,
    });
    doc.moveDown(0.3);
  };

  // ---------- Cover ----------
  addPage();
  doc.rect(0, 0, pageW(), 120).fill(INK.text);
  text(doc, "TIDELINE", left, 40, { font: "monoBold", size: 11, color: INK.brassLight, characterSpacing: 3 });
  text(doc, "Condition survey", left, 62, { font: "bold", size: 28, color: "#edf2f5" });
  doc.y = 150;
  text(doc, data.site.name, left, doc.y, { font: "bold", size: 20, width: contentW() });
  para(
    `${data.site.kind[0].toUpperCase()}${data.site.kind.slice(1)}${data.site.location ? ` · ${data.site.location}` : ""}`,
    { size: 11, color: INK.muted },
  );
  if (data.site.description) para(data.site.description, { size: 10 });
  doc.moveDown(0.6);
  const kv = (k: string, v: string) => {
    const y = doc.y;
    text(doc, k, left, y, { size: 10, color: INK.muted, width: 150 });
    const yk = doc.y;
    text(doc, v, left + 155, y, { size: 10, width: contentW() - 155 });
    doc.y = Math.max(doc.y, yk, y + 14);
    doc.x = left;
  };
  kv(
    "Scope",
    data.query.boardId
      ? `Board: ${data.boards[0]?.name ?? ""}`
      : `Whole site: ${data.boards.map((b) => b.name).join(", ") || "no boards yet"}`,
  );
  kv(
    "Survey period",
    data.inspectedFrom ? `${t.date(data.inspectedFrom)} to ${t.date(data.inspectedTo)}` : "No inspections recorded",
  );
  if (data.query.from || data.query.to)
    kv(
      "Observations included",
      `${data.query.from ?? "the start"} to ${data.query.to ?? "today"} (readings, inspections and photos outside are left out)`,
    );
  kv("Surveyed by", data.surveyors.length ? data.surveyors.map((s) => `${s.name} (${s.inspections})`).join(", ") : "—");
  kv("Report made", `${t.date(data.generatedAt)} by ${data.generatedBy}`);
  kv("Days and times", `On the site's clock, ${data.site.timeZone}`);
  kv(
    "Photos",
    data.query.photos === "yes" ? "As found and after work, up to two of each per position" : "Left out of this copy",
  );
  doc.moveDown(0.6);
  text(doc, "Flood event", left, doc.y, { font: "bold", size: 12, color: INK.brass });
  doc.moveDown(0.2);
  if (data.flood) {
    const f = data.flood;
    kv("Date", f.occurredOn);
    kv("Water", WATER_TYPE_LABELS[f.waterType as keyof typeof WATER_TYPE_LABELS] ?? f.waterType);
    kv("Greatest depth", f.maxDepthM != null ? `${fmtNum(f.maxDepthM)} m` : "not recorded");
    kv("Hours submerged", f.hoursSubmerged != null ? fmtNum(f.hoursSubmerged) : "not recorded");
    for (const b of data.boards)
      kv(
        `Water line, ${b.name}`,
        b.waterLineMm != null
          ? `${fmtNum(b.waterLineMm)} mm above the bottom of a ${fmtNum(b.faceHeightMm)} mm face`
          : "not recorded",
      );
    if (f.notes) kv("Notes", f.notes);
  } else para("No flood event is recorded for this site.", { color: INK.muted });
  cautionBox(doc, left, Math.max(doc.y + 16, pageH() - 200), contentW());

  // ---------- Contents ----------
  const toc = tocEntries(data);
  addPage();
  mark("contents", "Contents", 0);
  text(doc, "Contents", left, doc.y, { font: "bold", size: 18, color: INK.brass });
  doc.moveDown(0.6);
  for (const e of toc) {
    ensure(16);
    const y = doc.y;
    const indent = e.level === 1 ? 18 : 0;
    const num = o.plan?.pages.get(e.key);
    const dest = e.key.replace(/[^A-Za-z0-9]/g, "_");
    line(doc, e.title, left + indent, y, contentW() - indent - 50, {
      size: e.level === 0 ? 11 : 10,
      font: e.level === 0 ? "bold" : "body",
    });
    text(doc, num ? String(num) : "…", pageW() - MARGIN - 40, y, {
      size: 10,
      width: 40,
      align: "right",
      lineBreak: false,
    });
    if (o.plan) doc.goTo(left, y, contentW(), 13, dest);
    doc.y = y + (e.level === 0 ? 17 : 14);
    doc.x = left;
  }

  // ---------- Summary ----------
  if (sections.includes("summary")) {
    heading("summary", "Summary");
    drawSummary(doc, data, left, contentW(), ensure);
  }

  // ---------- Boards ----------
  let done = 0;
  for (const b of data.boards) {
    heading(`board:${b.id}`, b.name);
    para(
      `${b.location ? `${b.location} · ` : ""}${b.nominalVolts} V, ${b.phases === 3 ? "three-phase" : "single-phase"}, ${b.frequencyHz} Hz, ${EARTHING_LABELS[b.earthing as keyof typeof EARTHING_LABELS] ?? b.earthing}` +
        `${b.yearBuilt ? `, built ${b.yearBuilt}` : ""}${b.drawingRef ? ` · drawing ${b.drawingRef}` : ""} · ${b.positions.length} positions`,
      { color: INK.muted },
    );
    if (sections.includes("board")) {
      ensure(60);
      mark(`front:${b.id}`, "Board front", 1);
      text(doc, "Board front", left, doc.y, { font: "bold", size: 13, color: INK.brass });
      doc.moveDown(0.3);
      drawBoardFront(doc, b, left, contentW(), bottom() - doc.y, ensure);
    }
    if (sections.includes("positions")) {
      let currentSection: string | null | undefined;
      for (const p of b.positions) {
        if (p.sectionId !== currentSection) {
          currentSection = p.sectionId;
          const sec = b.sections.find((s) => s.id === p.sectionId);
          addPage();
          mark(
            sec ? `sec:${sec.id}` : `sec:none:${b.id}`,
            sec ? `Positions: ${sec.name}` : "Positions outside any section",
            1,
          );
          text(doc, `${b.name} · ${sec ? sec.name : "Outside any section"}`, left, doc.y, {
            font: "bold",
            size: 13,
            color: INK.brass,
            width: contentW(),
          });
          doc.moveDown(0.4);
        }
        await drawPosition(doc, p, left, contentW(), ensure, o, t);
        done++;
        await o.afterPosition?.(done);
      }
    }
    if (sections.includes("dryout")) {
      addPage();
      mark(`dryout:${b.id}`, "Insulation dry-out charts", 1);
      text(doc, `${b.name} · Insulation dry-out`, left, doc.y, { font: "bold", size: 13, color: INK.brass });
      doc.moveDown(0.3);
      para(
        `Corrected insulation resistance on a logarithmic scale (${data.criteria.correctionMethod === "ieee43_40c" ? "to 40 °C by the IEEE Std 43 rule" : "to 20 °C with the ANSI/NETA temperature correction table"}), ` +
          "with the minimum that applies as a line. The dashed extension is an estimate at the fitted rate, never a promise; re-test before any decision.",
        { size: 8.5, color: INK.muted },
      );
      drawDryOut(doc, b, left, contentW(), ensure, t);
    }
    if (sections.includes("rts")) {
      addPage();
      mark(`rts:${b.id}`, "Return-to-service record", 1);
      text(doc, `${b.name} · Return-to-service record`, left, doc.y, { font: "bold", size: 13, color: INK.brass });
      doc.moveDown(0.3);
      drawRts(doc, b, left, contentW(), ensure, t);
    }
    if (sections.includes("defects")) {
      addPage();
      mark(`defects:${b.id}`, "Defect register", 1);
      text(doc, `${b.name} · Defect register`, left, doc.y, { font: "bold", size: 13, color: INK.brass });
      doc.moveDown(0.3);
      drawDefects(doc, b, left, contentW(), ensure);
    }
  }

  // ---------- Parts ----------
  if (sections.includes("parts")) {
    heading("parts", "Parts wanted");
    drawParts(doc, data, left, contentW(), ensure);
  }

  // ---------- Safety and scope ----------
  heading("safety", "Safety caution and scope of this report");
  cautionBox(doc, left, doc.y, contentW());
  doc.moveDown(1);
  para(SCOPE_STATEMENT, { size: 11, font: "bold" });
  doc.moveDown(0.3);
  para("Where the values in this report come from:", { font: "bold" });
  for (const s of [
    "Rust grades: ASTM D610 (rust grade 10 to 0 by the percentage of surface rusted, Table 1), with the matching ISO 4628-3 Ri degree.",
    `Insulation minimum: the component's manufacturer value where recorded, else the site's minimum${data.criteria.minimumMegohms != null ? ` (${data.criteria.minimumMegohms} MΩ: ${data.criteria.minimumSource || "source not given"})` : ""}, else ANSI/NETA MTS Table 100.1 by voltage rating; polarization index per IEEE Std 43.`,
    "Contact resistance: poles compared with each other (the site's outlier percentage) and with any manufacturer maximum; thermal scans by temperature rise against similar parts (ANSI/NETA MTS thermographic guidance).",
    "Verdicts say only whether a reading meets the criterion the crew recorded. Priorities of the defect register plan the work; they make nothing safe.",
  ])
    para(`• ${s}`, { size: 9 });

  return { pages, totalPages: pageNo };
}

function cautionBox(doc: PDFKit.PDFDocument, x: number, y: number, w: number) {
  const bodyH = heightOf(doc, SAFETY_CAUTION[1], w - 28, { size: 9.5, lineGap: 1.5 });
  const h = bodyH + 52;
  doc.save().rect(x, y, w, h).fill("#fdf6e6").restore();
  doc.save().rect(x, y, 5, h).fill(INK.brassBar).restore();
  // A warning triangle drawn as a shape (no font has the sign).
  doc
    .save()
    .moveTo(x + 18, y + 24)
    .lineTo(x + 26, y + 10)
    .lineTo(x + 34, y + 24)
    .closePath()
    .lineWidth(1.4)
    .strokeColor(INK.flare)
    .stroke()
    .restore();
  text(doc, "!", x + 24.4, y + 13, { font: "bold", size: 9, color: INK.flare, lineBreak: false });
  text(doc, SAFETY_CAUTION[0], x + 42, y + 12, { font: "bold", size: 11, color: INK.flare, width: w - 56 });
  text(doc, SAFETY_CAUTION[1], x + 14, y + 34, { size: 9.5, width: w - 28, lineGap: 1.5 });
  doc.y = y + h + 6;
  doc.x = x;
}

function table(
  doc: PDFKit.PDFDocument,
  x: number,
  w: number,
  ensure: (h: number) => void,
  cols: Array<{ title: string; width: number; align?: "left" | "right"; mono?: boolean }>,
  rows: Array<Array<{ text: string; color?: string; bold?: boolean }>>,
) {
  const total = cols.reduce((s, c) => s + c.width, 0);
  const widths = cols.map((c) => (c.width / total) * w);
  const head = () => {
    const y = doc.y;
    doc.save().rect(x, y, w, 16).fill(INK.faint).restore();
    let cx = x;
    cols.forEach((c, i) => {
      line(doc, c.title, cx + 3, y + 4, widths[i] - 6, { font: "bold", size: 8, color: INK.muted, align: c.align });
      cx += widths[i];
    });
    doc.y = y + 18;
  };
  ensure(40);
  head();
  for (const r of rows) {
    const h =
      Math.max(
        12,
        ...r.map((cell, i) =>
          heightOf(doc, cell.text, widths[i] - 6, {
            size: 8.5,
            font: cols[i].mono ? "mono" : cell.bold ? "bold" : "body",
          }),
        ),
      ) + 4;
    if (doc.y + h > doc.page.height - MARGIN - 10) {
      doc.addPage();
      head();
    }
    const y = doc.y;
    let cx = x;
    r.forEach((cell, i) => {
      text(doc, cell.text, cx + 3, y + 2, {
        size: 8.5,
        width: widths[i] - 6,
        color: cell.color ?? INK.text,
        font: cols[i].mono ? "mono" : cell.bold ? "bold" : "body",
        align: cols[i].align,
      });
      cx += widths[i];
    });
    doc
      .moveTo(x, y + h)
      .lineTo(x + w, y + h)
      .lineWidth(0.3)
      .strokeColor(INK.rule)
      .stroke();
    doc.y = y + h + 1;
    doc.x = x;
  }
  doc.moveDown(0.5);
}

function drawSummary(doc: PDFKit.PDFDocument, data: ReportData, x: number, w: number, ensure: (h: number) => void) {
  const all = data.boards.flatMap((b) => b.positions);
  const surveyed = all.filter((p) => p.latest).length;
  const disp = new Map<string, number>();
  const grades = new Map<string, number>();
  let retained = 0;
  for (const p of all) {
    const d = p.component?.disposition ?? "undecided";
    disp.set(d, (disp.get(d) ?? 0) + 1);
    const g = p.latest?.astmGrade;
    const gk = g === null || g === undefined ? "ungraded" : String(g);
    grades.set(gk, (grades.get(gk) ?? 0) + 1);
    if (p.component?.heritage === "original" && p.component.custody !== "scrapped" && p.component.custody !== "missing")
      retained++;
  }
  const defects = data.boards.flatMap((b) => b.defects);
  const open = defects.filter((d) => isOpenDefect(d.status));
  const pct = (n: number) => (all.length ? `${Math.round((n / all.length) * 1000) / 10} %` : "—");

  const big = (label: string, value: string, bx: number, by: number) => {
    doc
      .save()
      .rect(bx, by, w / 4 - 6, 54)
      .lineWidth(0.6)
      .strokeColor(INK.rule)
      .stroke()
      .restore();
    text(doc, value, bx + 8, by + 8, { font: "bold", size: 18, color: INK.text, width: w / 4 - 20, lineBreak: false });
    text(doc, label, bx + 8, by + 33, { size: 8, color: INK.muted, width: w / 4 - 20 });
  };
  const y0 = doc.y;
  big("positions surveyed of all", `${surveyed} / ${all.length}`, x, y0);
  big("original fabric retained", pct(retained), x + w / 4, y0);
  big("open defects", String(open.length), x + w / 2, y0);
  big("part lines wanted (open)", String(data.parts.length), x + (3 * w) / 4, y0);
  doc.y = y0 + 66;
  doc.x = x;
  text(
    doc,
    "Positions surveyed: with at least one inspection in the report's period. Original fabric retained: components original to the board that are neither scrapped nor missing, of all positions.",
    x,
    doc.y,
    { size: 8, color: INK.muted, width: w },
  );
  doc.moveDown(0.8);

  text(doc, "Dispositions", x, doc.y, { font: "bold", size: 12, color: INK.brass });
  doc.moveDown(0.2);
  table(
    doc,
    x,
    w,
    ensure,
    [
      { title: "Disposition", width: 3 },
      { title: "Positions", width: 1, align: "right" },
      { title: "Share", width: 1, align: "right" },
    ],
    [...DISPOSITIONS, "undecided" as const].map((d) => [
      { text: d === "undecided" ? "Not yet decided" : DISPOSITION_LABELS[d] },
      { text: String(disp.get(d) ?? 0) },
      { text: pct(disp.get(d) ?? 0) },
    ]),
  );

  text(doc, "Latest rust grade (ASTM D610)", x, doc.y, { font: "bold", size: 12, color: INK.brass });
  doc.moveDown(0.2);
  ensure(14 * 12 + 20);
  const maxN = Math.max(1, ...grades.values());
  for (const g of ["10", "9", "8", "7", "6", "5", "4", "3", "2", "1", "0", "ungraded"]) {
    const n = grades.get(g) ?? 0;
    const y = doc.y;
    text(doc, g === "ungraded" ? "Not graded" : `Grade ${g}`, x, y, { size: 8.5, width: 70, lineBreak: false });
    const bw = ((w - 140) * n) / maxN;
    if (n)
      doc
        .save()
        .rect(x + 75, y + 1, bw, 9)
        .fill(gradeFill(g === "ungraded" ? null : Number(g)))
        .restore();
    text(doc, String(n), x + 80 + bw, y, { size: 8.5, width: 50, lineBreak: false });
    doc.y = y + 12.5;
    doc.x = x;
  }
  doc.moveDown(0.8);

  text(doc, "Open defects by severity", x, doc.y, { font: "bold", size: 12, color: INK.brass });
  doc.moveDown(0.2);
  table(
    doc,
    x,
    w,
    ensure,
    [
      { title: "Severity", width: 3 },
      { title: "Open", width: 1, align: "right" },
      { title: "Safety-critical", width: 1, align: "right" },
      { title: "Blocks energisation", width: 1, align: "right" },
    ],
    [...DEFECT_SEVERITIES].reverse().map((s) => {
      const of = open.filter((d) => d.severity === s);
      return [
        { text: DEFECT_SEVERITY_LABELS[s] },
        { text: String(of.length) },
        { text: String(of.filter((d) => d.safetyCritical).length) },
        { text: String(of.filter((d) => d.blocksEnergisation).length) },
      ];
    }),
  );

  if (data.boards.length > 1) {
    text(doc, "Per board", x, doc.y, { font: "bold", size: 12, color: INK.brass });
    doc.moveDown(0.2);
    table(
      doc,
      x,
      w,
      ensure,
      [
        { title: "Board", width: 3 },
        { title: "Positions", width: 1, align: "right" },
        { title: "Surveyed", width: 1, align: "right" },
        { title: "Open defects", width: 1, align: "right" },
      ],
      data.boards.map((b) => [
        { text: b.name },
        { text: String(b.positions.length) },
        { text: String(b.positions.filter((p) => p.latest).length) },
        { text: String(b.defects.filter((d) => isOpenDefect(d.status)).length) },
      ]),
    );
  }
}

/** Paper tints for the grade bands (the number is always printed too; colour never stands alone). */
export function gradeFill(g: number | null) {
  if (g === null) return "#ffffff";
  if (g >= 9) return INK.kelpLight;
  if (g >= 6) return INK.brassLight;
  if (g >= 3) return INK.rustLight;
  return INK.flareLight;
}

function drawBoardFront(
  doc: PDFKit.PDFDocument,
  b: ReportBoard,
  x: number,
  w: number,
  room: number,
  ensure: (h: number) => void,
) {
  const rows = Math.max(1, b.gridRows);
  const cols = Math.max(1, b.gridCols);
  const legendH = 70;
  const cell = Math.min(w / cols, Math.max(18, (Math.min(room, 620) - legendH) / rows), 80);
  const gw = cell * cols;
  const gh = cell * rows;
  ensure(gh + legendH);
  const ox = x + (w - gw) / 2;
  const oy = doc.y + 4;
  doc.save().rect(ox, oy, gw, gh).lineWidth(1).strokeColor(INK.text).stroke().restore();
  const small = cell < 34;
  for (const p of b.positions) {
    const px = ox + (p.gridCol - 1) * cell;
    const py = oy + (p.gridRow - 1) * cell;
    const pw = p.colSpan * cell;
    const ph = p.rowSpan * cell;
    const g = p.latest?.astmGrade ?? null;
    doc
      .save()
      .rect(px + 1, py + 1, pw - 2, ph - 2)
      .fillAndStroke(gradeFill(g), INK.muted)
      .restore();
    if (p.component?.dispositionOverridden)
      doc
        .save()
        .moveTo(px + pw - 9, py + 1)
        .lineTo(px + pw - 1, py + 1)
        .lineTo(px + pw - 1, py + 9)
        .closePath()
        .fill(INK.text)
        .restore();
    const fs = small ? 5.5 : 7;
    line(doc, p.designation, px + 3, py + 3, pw - 6, { font: "monoBold", size: fs });
    if (ph >= fs * 3.2)
      line(doc, `${g === null ? "G–" : `G${g}`} ${COMPONENT_KIND_SHORT[p.kind]}`, px + 3, py + 3 + fs * 1.3, pw - 6, {
        font: "mono",
        size: fs,
      });
    if (ph >= fs * 4.6) {
      const d = p.component?.disposition;
      line(doc, d ? DISPOSITION_LABELS[d] : "Undecided", px + 3, py + 3 + fs * 2.6, pw - 6, {
        size: fs,
        font: d ? "bold" : "italic",
      });
    }
  }
  if (b.waterLineMm != null && b.waterLineMm >= 0 && b.faceHeightMm && b.faceHeightMm > 0) {
    const frac = waterLineFromTop(b.waterLineMm, b.faceHeightMm);
    const wy = oy + frac * gh;
    doc
      .save()
      .moveTo(ox - 6, wy)
      .lineTo(ox + gw + 6, wy)
      .lineWidth(1.6)
      .dash(5, { space: 3 })
      .strokeColor(INK.tide)
      .stroke()
      .undash()
      .restore();
    const label = `Flood water line ${fmtNum(b.waterLineMm)} mm`;
    const lw = widthOf(doc, label, { size: 7, font: "bold" }) + 6;
    doc
      .save()
      .rect(ox + gw - lw, wy - 10, lw, 9)
      .fill("#ffffff")
      .restore();
    text(doc, label, ox + gw - lw + 3, wy - 9, { size: 7, font: "bold", color: INK.tide, lineBreak: false });
  }
  doc.y = oy + gh + 10;
  doc.x = x;
  // Legend
  const ly = doc.y;
  let lx = x;
  for (const [label, g] of [
    ["Grade 9-10", 10],
    ["Grade 6-8", 7],
    ["Grade 3-5", 4],
    ["Grade 0-2", 1],
    ["Not graded", null],
  ] as const) {
    doc.save().rect(lx, ly, 10, 10).fillAndStroke(gradeFill(g), INK.muted).restore();
    text(doc, label, lx + 13, ly + 1, { size: 7.5, lineBreak: false });
    lx += widthOf(doc, label, { size: 7.5 }) + 28;
  }
  doc.y = ly + 15;
  doc.x = x;
  text(
    doc,
    "Each tile: designation; G and the latest ASTM D610 rust grade with the kind; the disposition in words. A black corner marks a curator's override of the recommendation. The dashed blue line is the flood water line on the board face.",
    x,
    doc.y,
    { size: 7.5, color: INK.muted, width: w },
  );
  doc.moveDown(0.5);
}

function verdictColor(v: Verdict) {
  return v === "meets" ? INK.kelp : v === "below_minimum" ? INK.flare : INK.rust;
}

async function drawPosition(
  doc: PDFKit.PDFDocument,
  p: ReportPosition,
  x: number,
  w: number,
  ensure: (h: number) => void,
  o: RenderOptions,
  t: ReportClock,
) {
  const c = p.component;
  const l = p.latest;
  const colW = (w - 16) / 2;
  const facts: Array<[string, string]> = [];
  if (c) {
    const maker = [c.maker, c.model].filter(Boolean).join(" ");
    if (maker) facts.push(["Maker, model", maker]);
    const rating = [
      c.ratingAmps != null ? `${c.ratingAmps} A` : "",
      c.poles != null ? `${c.poles}-pole` : "",
      c.voltageRating != null ? `${c.voltageRating} V` : "",
      c.interruptingKa != null ? `${c.interruptingKa} kA` : "",
    ]
      .filter(Boolean)
      .join(", ");
    if (rating) facts.push(["Rating", rating]);
    if (c.frame || c.mounting) facts.push(["Frame, mounting", [c.frame, c.mounting].filter(Boolean).join(", ")]);
    if (c.meterRange) facts.push(["Meter range", c.meterRange]);
    if (c.lampWatts != null) facts.push(["Lamp", `${c.lampWatts} W`]);
    if (c.serial || c.year)
      facts.push(["Serial, year", [c.serial, c.year ? String(c.year) : ""].filter(Boolean).join(", ")]);
    facts.push(["Heritage", HERITAGE_LABELS[c.heritage]]);
    facts.push(["Custody", `${CUSTODY_LABELS[c.custody]}${c.custodyLocation ? `; at ${c.custodyLocation}` : ""}`]);
  } else facts.push(["Component", "None recorded at this position"]);

  const cond: Array<[string, string, string?]> = [];
  if (l) {
    cond.push([
      "Rust grade",
      l.astmGrade != null
        ? `ASTM D610 grade ${l.astmGrade}${l.percentRusted != null ? ` (${fmtNum(l.percentRusted)} % rusted)` : ""}${l.isoRi ? `, ISO 4628-3 ${l.isoRi}` : ""}`
        : "Not graded",
    ]);
    cond.push([
      "Inspected",
      `${t.date(l.inspectedAt)}${l.inspectorName ? ` by ${l.inspectorName}` : ""}${l.belowWaterLine === true ? ", below the water line" : l.belowWaterLine === false ? ", above the water line" : ""}`,
    ]);
    const found = [
      ...l.contaminants.map((k) => CONTAMINANT_LABELS[k as Contaminant] ?? k),
      l.mechanism ? `mechanism ${(MECHANISM_LABELS[l.mechanism as Mechanism] ?? l.mechanism).toLowerCase()}` : "",
      l.insulation
        ? `insulation ${(INSULATION_STATE_LABELS[l.insulation as InsulationState] ?? l.insulation).toLowerCase()}`
        : "",
    ].filter(Boolean);
    if (found.length) cond.push(["Found", found.join(", ")]);
    if (l.notes) cond.push(["Notes", l.notes]);
  } else cond.push(["Survey", "Not yet inspected in this period"]);
  if (c) {
    if (c.disposition) {
      cond.push([
        "Disposition",
        `${DISPOSITION_LABELS[c.disposition]}${c.decidedByName ? `, decided by ${c.decidedByName}` : ""}${c.dispositionAt ? ` on ${t.date(c.dispositionAt)}` : ""}`,
      ]);
      if (c.dispositionOverridden && c.dispositionRecommended)
        cond.push([
          "Override",
          `Curator override: recommended ${DISPOSITION_LABELS[c.dispositionRecommended].toLowerCase()}, decided ${DISPOSITION_LABELS[c.disposition].toLowerCase()}`,
          INK.flare,
        ]);
      if (c.dispositionReason) cond.push(["Reason", c.dispositionReason]);
    } else cond.push(["Disposition", "Not yet decided"]);
  }

  const readings: Array<{ text: string; verdict: Verdict }> = [];
  const ins = p.insulation[0];
  if (ins) {
    const j = ins.judgement;
    readings.push({
      text:
        `Insulation ${t.date(ins.measuredAt)} (${ins.conductors}, ${ins.testVoltsDc} V DC): ${fmtNum(ins.megohms)} MΩ at ${ins.equipmentTempC} °C` +
        `${j.correctedMegohms != null ? `, ${fmtNum(j.correctedMegohms)} MΩ at ${j.baseTemperatureC} °C` : ""}; minimum ${fmtNum(j.minimum.megohms)} MΩ (${j.minimum.source.table})${j.pi != null ? `; PI ${fmtNum(j.pi)}` : ""}`,
      verdict: j.verdict,
    });
  }
  const con = p.contacts[0];
  if (con)
    readings.push({
      text: `Contact resistance ${t.date(con.measuredAt)} at ${con.testCurrentA} A: ${con.poleMicroOhms.map((v) => fmtNum(v)).join(" / ")} µΩ by pole`,
      verdict: con.judgement.verdict,
    });
  const th = p.thermal[0];
  if (th)
    readings.push({
      text: `Thermal scan ${t.date(th.measuredAt)}: ${fmtNum(th.componentTempC)} °C${th.judgement.overSimilarC != null ? `, ${fmtNum(th.judgement.overSimilarC)} °C over similar parts` : ""}; ${th.judgement.action}`,
      verdict: th.judgement.verdict,
    });

  // Height of the block, measured with the same fonts as it is drawn.
  const rowH = (pairs: Array<[string, string, string?]>) =>
    pairs.reduce((s, [, v]) => s + Math.max(11, heightOf(doc, v, colW - 78, { size: 8.5 })) + 1.5, 0);
  const photosH = p.photos.length ? PHOTO_H + 16 : 0;
  const readH = readings.reduce(
    (s, r) => s + heightOf(doc, `${r.text} - ${VERDICT_LABELS[r.verdict]}`, w - 10, { size: 8.5 }) + 2,
    0,
  );
  const blockH = 22 + Math.max(rowH(facts), rowH(cond)) + photosH + readH + 16;
  ensure(Math.min(blockH, doc.page.height - 2 * MARGIN - 60));

  const y0 = doc.y;
  doc.save().rect(x, y0, w, 18).fill(INK.faint).restore();
  text(doc, p.designation, x + 5, y0 + 4, { font: "monoBold", size: 10, lineBreak: false });
  const dw = widthOf(doc, p.designation, { font: "monoBold", size: 10 });
  line(
    doc,
    `${COMPONENT_KIND_LABELS[p.kind]}${p.circuit ? ` · ${p.circuit}` : ""}`,
    x + dw + 14,
    y0 + 5,
    w - dw - 120,
    { size: 9 },
  );
  if (c?.tagNumber)
    text(doc, `Tag ${c.tagNumber}`, x + w - 100, y0 + 5, {
      font: "mono",
      size: 8.5,
      width: 95,
      align: "right",
      lineBreak: false,
    });
  doc.y = y0 + 22;

  const pairs = (list: Array<[string, string, string?]>, cx: number, startY: number) => {
    let y = startY;
    for (const [k, v, color] of list) {
      text(doc, k, cx, y, { size: 8, color: INK.muted, width: 74, lineBreak: false });
      text(doc, v, cx + 78, y, {
        size: 8.5,
        width: colW - 78,
        color: color ?? INK.text,
        font: color ? "bold" : "body",
      });
      y = Math.max(doc.y, y + 11) + 1.5;
    }
    return y;
  };
  const yl = pairs(facts, x, doc.y);
  const yr = pairs(cond, x + colW + 16, y0 + 22);
  doc.y = Math.max(yl, yr) + 2;

  if (p.photos.length) {
    ensure(PHOTO_H + 16);
    const py = doc.y;
    let px = x;
    for (const ph of p.photos.slice(0, 4)) {
      const img = o.dry || !o.photo ? null : await o.photo(ph);
      if (img) {
        try {
          doc.image(img, px, py, { fit: [PHOTO_W, PHOTO_H], align: "center", valign: "center" });
        } catch {
          doc.save().rect(px, py, PHOTO_W, PHOTO_H).fill(INK.faint).restore();
        }
      } else doc.save().rect(px, py, PHOTO_W, PHOTO_H).fill(INK.faint).restore();
      line(doc, `${PHOTO_KIND_LABELS[ph.kind]} · ${t.date(ph.takenAt)}`, px, py + PHOTO_H + 2, PHOTO_W, {
        size: 7,
        color: INK.muted,
      });
      px += PHOTO_W + 8;
    }
    doc.y = py + PHOTO_H + 14;
  }
  for (const r of readings) {
    const y = doc.y;
    text(doc, `${r.text} `, x, y, { size: 8.5, width: w - 10, continued: true });
    text(doc, `- ${VERDICT_LABELS[r.verdict]}`, undefined, undefined, {
      size: 8.5,
      font: "bold",
      color: verdictColor(r.verdict),
    });
    doc.moveDown(0.15);
  }
  doc.x = x;
  doc
    .moveTo(x, doc.y + 4)
    .lineTo(x + w, doc.y + 4)
    .lineWidth(0.8)
    .strokeColor(INK.rule)
    .stroke();
  doc.y += 12;
}

function drawDryOut(
  doc: PDFKit.PDFDocument,
  b: ReportBoard,
  x: number,
  w: number,
  ensure: (h: number) => void,
  t: ReportClock,
) {
  if (b.insulationSeries.length === 0) {
    text(doc, "No insulation readings are recorded for this board in this period.", x, doc.y, {
      size: 9.5,
      color: INK.muted,
    });
    return;
  }
  const cw = (w - 16) / 2;
  const ch = 150;
  let col = 0;
  let rowY = doc.y;
  for (const s of b.insulationSeries) {
    const series = dryOutSeries(s.readings);
    if (col === 0) {
      ensure(ch + 40);
      rowY = doc.y;
    }
    const cx = x + col * (cw + 16);
    line(doc, s.label, cx, rowY, cw, { font: "bold", size: 9 });
    const gx = cx + 34,
      gy = rowY + 16,
      gw = cw - 40,
      gh = ch - 40;
    doc.save().rect(gx, gy, gw, gh).lineWidth(0.5).strokeColor(INK.rule).stroke().restore();
    if (!series) {
      text(doc, "No corrected readings to draw.", gx + 6, gy + 6, { size: 8, color: INK.muted, width: gw - 12 });
    } else {
      const [lo, hi] = series.yDomain;
      const [t0, t1] = series.xDomain;
      const X = (t: number) => gx + (t1 > t0 ? ((t - t0) / (t1 - t0)) * gw : gw / 2);
      const Y = (v: number) =>
        gy + gh - ((Math.log10(v) - Math.log10(lo)) / (Math.log10(hi) - Math.log10(lo) || 1)) * gh;
      for (const t of series.yTicks) {
        doc
          .save()
          .moveTo(gx, Y(t))
          .lineTo(gx + gw, Y(t))
          .lineWidth(0.25)
          .strokeColor(INK.faint)
          .stroke()
          .restore();
        text(doc, fmtNum(t), cx, Y(t) - 3, {
          size: 6.5,
          color: INK.muted,
          width: 30,
          align: "right",
          lineBreak: false,
        });
      }
      doc
        .save()
        .moveTo(gx, Y(series.minimum))
        .lineTo(gx + gw, Y(series.minimum))
        .lineWidth(1)
        .strokeColor(INK.flare)
        .stroke()
        .restore();
      text(doc, `minimum ${fmtNum(series.minimum)} MΩ`, gx + 3, Y(series.minimum) - 9, {
        size: 6.5,
        color: INK.flare,
        lineBreak: false,
      });
      doc.save();
      series.points.forEach((pt, i) => (i === 0 ? doc.moveTo(X(pt.t), Y(pt.y)) : doc.lineTo(X(pt.t), Y(pt.y))));
      doc.lineWidth(1.2).strokeColor(INK.tide).stroke().restore();
      for (const pt of series.points) doc.save().circle(X(pt.t), Y(pt.y), 1.8).fill(INK.tide).restore();
      if (series.extension) {
        doc
          .save()
          .moveTo(X(series.extension[0].t), Y(series.extension[0].y))
          .lineTo(X(series.extension[1].t), Y(series.extension[1].y))
          .lineWidth(1)
          .dash(3, { space: 2 })
          .strokeColor(INK.tide)
          .stroke()
          .undash()
          .restore();
      }
      text(doc, t.date(new Date(t0)), gx, gy + gh + 3, { size: 6.5, color: INK.muted, lineBreak: false });
      text(doc, t.date(new Date(t1)), gx + gw - 50, gy + gh + 3, {
        size: 6.5,
        color: INK.muted,
        width: 50,
        align: "right",
        lineBreak: false,
      });
      text(doc, `${series.points.length} readings, corrected MΩ (log scale)`, gx, gy + gh + 12, {
        size: 6.5,
        color: INK.muted,
        lineBreak: false,
      });
    }
    col = (col + 1) % 2;
    if (col === 0) doc.y = rowY + ch + 6;
    else doc.y = rowY;
  }
  if (col === 1) doc.y = rowY + ch + 6;
  doc.x = x;
}

function drawDefects(doc: PDFKit.PDFDocument, b: ReportBoard, x: number, w: number, ensure: (h: number) => void) {
  if (b.defects.length === 0) {
    text(doc, "No defects are recorded for this board.", x, doc.y, { size: 9.5, color: INK.muted });
    return;
  }
  text(
    doc,
    "Open defects first, in the register's priority order (points plan the work; they never make equipment safe), then closed ones.",
    x,
    doc.y,
    { size: 8, color: INK.muted, width: w },
  );
  doc.moveDown(0.4);
  table(
    doc,
    x,
    w,
    ensure,
    [
      { title: "Ref", width: 0.7, mono: true },
      { title: "Position", width: 0.8, mono: true },
      { title: "Defect", width: 3.2 },
      { title: "Category", width: 1.3 },
      { title: "Severity", width: 1 },
      { title: "Status", width: 1.2 },
      { title: "Assignee, due", width: 1.5 },
      { title: "Points", width: 0.7, align: "right" },
    ],
    b.defects.map((d) => [
      { text: `D-${d.ref}` },
      { text: d.designation ?? "—" },
      {
        text: `${d.title}${d.safetyCritical ? " (safety-critical)" : ""}${d.blocksEnergisation ? " (blocks energisation)" : ""}`,
        color: d.safetyCritical ? INK.flare : undefined,
      },
      { text: DEFECT_CATEGORY_LABELS[d.category as keyof typeof DEFECT_CATEGORY_LABELS] ?? d.category },
      { text: DEFECT_SEVERITY_LABELS[d.severity] },
      { text: DEFECT_STATUS_LABELS[d.status] },
      { text: [d.assigneeName, d.dueOn].filter(Boolean).join(", ") || "—" },
      { text: String(Math.round(d.priorityScore)) },
    ]),
  );
}

function drawParts(doc: PDFKit.PDFDocument, data: ReportData, x: number, w: number, ensure: (h: number) => void) {
  if (data.parts.length === 0) {
    text(doc, "No parts are wanted at present.", x, doc.y, { size: 9.5, color: INK.muted });
    return;
  }
  text(
    doc,
    "Lines still open (wanted, lead found, acquired, received), one per specification, with the positions that need each.",
    x,
    doc.y,
    { size: 8, color: INK.muted, width: w },
  );
  doc.moveDown(0.4);
  table(
    doc,
    x,
    w,
    ensure,
    [
      { title: "Line", width: 0.6 },
      { title: "Part", width: 2.8 },
      { title: "Qty", width: 0.5, align: "right" },
      { title: "Status", width: 1.1 },
      { title: "Heritage rule", width: 1.5 },
      { title: "For positions", width: 2 },
    ],
    data.parts.map((l) => [
      { text: l.ref },
      { text: l.title },
      { text: String(l.qty) },
      { text: PART_STATUS_LABELS[l.status] },
      { text: HERITAGE_RULE_LABELS[l.heritageRule] },
      {
        text:
          l.positions
            .filter((p) => p.state === "active")
            .map((p) => `${p.boardName ?? ""} ${p.designation ?? ""}`.trim())
            .join(", ") || "spares",
      },
    ]),
  );
}

/** Stages in order with their hold points and every sign-off entry; released-with-reason items and incidents in red. */
function drawRts(
  doc: PDFKit.PDFDocument,
  b: ReportBoard,
  x: number,
  w: number,
  ensure: (h: number) => void,
  t: ReportClock,
) {
  const v = b.rts;
  if (!v || v.stages.length === 0) {
    text(doc, "No return-to-service stages are recorded for this board.", x, doc.y, { size: 9.5, color: INK.muted });
    return;
  }
  text(
    doc,
    "Each stage as planned and as signed: hold points, who signed them and when. Items released with a reason instead of signed are in red. The record shows what people signed; it declares nothing safe.",
    x,
    doc.y,
    { size: 8, color: INK.muted, width: w },
  );
  doc.moveDown(0.4);
  v.stages.forEach((st, i) => {
    ensure(90);
    text(doc, `Stage ${i + 1}: ${st.name} · ${STAGE_STATUS_LABELS[st.status] ?? st.status}`, x, doc.y, {
      font: "bold",
      size: 11,
      width: w,
    });
    const bits = [
      SUPPLY_LABELS[st.supply] ?? st.supply,
      st.protectionDevice
        ? `protection ${st.protectionDevice}${st.protectionRatingA != null ? ` ${st.protectionRatingA} A` : ""}`
        : "",
      st.qualifiedPerson
        ? `qualified person ${st.qualifiedPerson.name}${st.qualifiedPerson.qualification ? ` (${st.qualifiedPerson.qualification})` : ""}`
        : "",
      st.energisedAt ? `energised ${t.date(st.energisedAt)}` : "",
      st.releasedAt ? `released ${t.date(st.releasedAt)}` : "",
      `watch ${st.watchHours} h, checks every ${st.checkEveryHours} h`,
      st.positions.length ? `positions ${st.positions.map((p) => p.designation).join(", ")}` : "",
    ].filter(Boolean);
    text(doc, bits.join(" · "), x, doc.y, { size: 8.5, color: INK.muted, width: w });
    doc.moveDown(0.2);
    table(
      doc,
      x,
      w,
      ensure,
      [
        { title: "Step", width: 3 },
        { title: "Kind", width: 1.3 },
        { title: "Entries (oldest first)", width: 4 },
      ],
      st.steps.map((step) => {
        const released = step.entries.some((e) => e.kind === "released" && !e.supersededBy);
        const entries =
          step.entries
            .map(
              (e) =>
                `${e.kind === "signed" ? "Signed" : e.kind === "released" ? "Released with reason" : "Struck"} by ${e.signerName} ${t.time(e.signedAt)}${e.reason ? `: ${e.reason}` : ""}${e.supersededBy ? " (superseded)" : ""}`,
            )
            .join("\n") || "Not signed";
        return [
          {
            text: `${step.title}${step.qualifiedOnly ? " (qualified person)" : ""}`,
            color: released ? INK.flare : undefined,
            bold: released,
          },
          { text: STEP_KIND_LABELS[step.kind] ?? step.kind },
          { text: entries, color: released ? INK.flare : undefined },
        ];
      }),
    );
  });
  const events = v.events.filter((e) => e.kind !== "signoff");
  if (events.length) {
    text(doc, "Energisations, watch checks, incidents and breaker operations", x, doc.y, {
      font: "bold",
      size: 11,
      color: INK.brass,
    });
    doc.moveDown(0.2);
    table(
      doc,
      x,
      w,
      ensure,
      [
        { title: "When (UTC)", width: 1.4 },
        { title: "Stage", width: 1.6 },
        { title: "What", width: 4 },
        { title: "By", width: 1.2 },
      ],
      events.map((e) => {
        const red = e.alert || e.kind === "incident";
        return [
          { text: t.time(e.at) },
          { text: e.stageName },
          { text: `${e.title}${e.detail ? `: ${e.detail}` : ""}`, color: red ? INK.flare : undefined, bold: red },
          { text: e.by ?? "—" },
        ];
      }),
    );
  }
}
