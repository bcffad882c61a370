import { createRequire } from 'node:module';
import path from 'node:path';
import PDFDocument from 'pdfkit';

const require = createRequire(import.meta.url);
// IBM Plex Sans ships as WOFF in @fontsource, which pdfkit's font engine reads; only the Latin subset is embedded,
// so reports keep to Latin-1 and General Punctuation characters (no arrows, no Greek: see `pdfText`).
const fontDir = path.join(path.dirname(require.resolve('@fontsource/ibm-plex-sans/package.json')), 'files');
const FONT_REGULAR = path.join(fontDir, 'ibm-plex-sans-latin-400-normal.woff');
const FONT_BOLD = path.join(fontDir, 'ibm-plex-sans-latin-600-normal.woff');

export const INK = '#1f2933';
export const MUTED = '#5f6b7a';
export const GRID = '#d5dbe3';

export const SAFETY = [
  'Projectiles at hundreds of m/s injure: fire only into a rated backstop, with the exclusion zone clear. Never at people.',
  'Evacuated tubes can implode: rated tubing, shielding and eye protection. Burst discs and pressurised variants add pressure-vessel hazards.',
  'The exit makes a loud report: hearing protection for everyone nearby.',
  "The lab's own safety rules and trained supervision govern every shot; Gatepost only records it.",
];

/** Text the embedded Latin subset can show: Greek letters, subscripts and maths signs spelt out. */
export function pdfText(text: string): string {
  return text
    .replace(/χ²\/ν/g, 'chi²/dof').replace(/χ²/g, 'chi²').replace(/ν/g, 'dof').replace(/γ/g, 'gamma').replace(/Δ/g, 'Delta')
    .replace(/₀/g, '0').replace(/−/g, '-').replace(/≈/g, '~').replace(/√/g, 'sqrt').replace(/≤/g, '<=').replace(/≥/g, '>=');
}

export interface ReportDocument {
  doc: PDFKit.PDFDocument;
  left: number;
  width: number;
  /** A section heading with a rule under it (a new page when little room is left). */
  heading: (text: string) => void;
  /** Label/value rows. */
  table: (rows: [string, string][], labelWidth?: number) => void;
  /** Writes the footer on every page and ends the document; resolves to the PDF bytes. */
  finish: (footer: string) => Promise<Buffer>;
}

/** An A4 report in the product's type and colours, with the helpers every report uses. */
export function createReportDocument(info: { title: string; author: string }): ReportDocument {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: 48, bottom: 48, left: 50, right: 50 },
    info: { Title: info.title, Author: info.author, Creator: 'Gatepost' },
    bufferPages: true,
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  doc.registerFont('regular', FONT_REGULAR);
  doc.registerFont('bold', FONT_BOLD);
  const left = doc.page.margins.left;
  const width = doc.page.width - left - doc.page.margins.right;

  const heading = (text: string) => {
    if (doc.y > doc.page.height - 140) doc.addPage();
    doc.moveDown(0.6).font('bold').fontSize(12).fillColor(INK).text(text, left, doc.y);
    doc.moveTo(left, doc.y + 2).lineTo(left + width, doc.y + 2).lineWidth(0.5).strokeColor(GRID).stroke();
    doc.moveDown(0.4);
  };
  const table = (rows: [string, string][], labelWidth = 170) => {
    for (const [label, value] of rows) {
      if (doc.y > doc.page.height - 70) doc.addPage();
      const y = doc.y;
      doc.font('regular').fontSize(9.5).fillColor(MUTED).text(label, left, y, { width: labelWidth - 8 });
      const afterLabel = doc.y;
      doc.fillColor(INK).text(value, left + labelWidth, y, { width: width - labelWidth });
      doc.y = Math.max(afterLabel, doc.y) + 2;
    }
  };
  const finish = (footer: string) => {
    const range = doc.bufferedPageRange();
    for (let i = 0; i < range.count; i++) {
      doc.switchToPage(range.start + i);
      const bottom = doc.page.margins.bottom;
      doc.page.margins.bottom = 0;
      doc.font('regular').fontSize(7.5).fillColor(MUTED).text(`${footer} - page ${i + 1} of ${range.count}`, left, doc.page.height - 30, { width, align: 'center', lineBreak: false });
      doc.page.margins.bottom = bottom;
    }
    doc.end();
    return done;
  };
  return { doc, left, width, heading, table, finish };
}
