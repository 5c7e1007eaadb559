/**
 * The one setup of every PDF Coilpath makes (service summary, Fix Quality report, …):
 *
 * - **Roboto Flex embedded** (subset), the product's own typeface, so any name — "Łukasz Żółć",
 *   "Nguyễn Thị Hương" — and "−", "→", "≥", "°" print as written. The standard PDF fonts (Helvetica)
 *   cover WinAnsi only and would drop them. The file is the static Regular instance in TrueType from
 *   `@expo-google-fonts/roboto-flex`: the `@fontsource` packages the web uses ship Roboto Flex only
 *   as WOFF/WOFF2 cut into unicode-range subsets (latin, latin-ext, vietnamese…), so no single file
 *   of theirs holds a Polish and a Vietnamese name together, and pdfkit cannot fall back from one
 *   font to another within a line. There is no bold instance in TrueType; emphasis is drawn by
 *   filling and stroking the same glyphs (`strong`), which keeps the text extractable.
 * - **Tagged** for screen readers: `tagged: true` (a structure tree and MarkInfo), the document
 *   language, a title in the document info shown by the viewer (`displayTitle`), headings (H1/H2),
 *   paragraphs, lists and tables (Table/TR/TH/TD) in reading order; rules are marked as artifacts.
 */
import { createRequire } from 'node:module';
import PDFDocument from 'pdfkit';

const require = createRequire(import.meta.url);

/** Roboto Flex Regular, TrueType (SIL Open Font License 1.1, shipped with the package). */
export const PDF_FONT_FILE = require.resolve('@expo-google-fonts/roboto-flex/400Regular/RobotoFlex_400Regular.ttf');

export const pdfInk = '#17212B';
export const pdfSlate = '#5B6B7A';
const ruleColour = '#D5DDE4';

export interface PdfSetup {
  /** The document's title: in the document info, shown by the viewer instead of the file name. */
  title: string;
  subject?: string;
  /** BCP 47 language of the text (default `en-US`). */
  lang?: string;
  /** When it was made (the server's clock), for the document info. */
  createdAt?: Date;
  margin?: number;
}

interface TextStyle {
  size?: number;
  color?: string;
  strong?: boolean;
  align?: 'left' | 'right' | 'center';
}

export interface CoilpathPdf {
  readonly doc: PDFKit.PDFDocument;
  /** Left edge and width of the text column. */
  readonly left: number;
  readonly width: number;
  heading(text: string, level?: 1 | 2, style?: TextStyle): void;
  /** A paragraph; `lead` is an emphasised label printed first on the same line ("Site: "). */
  paragraph(text: string, style?: TextStyle & { lead?: string }): void;
  /** A list (L/LI/Lbl/LBody), each item after a bullet. */
  list(items: string[], style?: TextStyle): void;
  /**
   * A table with a header row: `widths` are relative, `align` per column (default: first left,
   * others right). The header row is drawn again, as an artifact, at the top of each new page.
   */
  table(
    headers: string[],
    widths: number[],
    rows: string[][],
    options?: { align?: ('left' | 'right')[]; size?: number; empty?: string },
  ): void;
  /** Starts a new page when less than `height` points are left. */
  ensureSpace(height: number): void;
  /** A picture (an image drawn by `draw`) tagged as a Figure with its alternate text for screen readers. */
  figure(alt: string, draw: () => void): void;
  /** Drawing that is decoration, not content (rules): marked as an artifact. */
  artifact(draw: () => void): void;
  /** Ends the document; resolves to the file's bytes. */
  finish(): Promise<Buffer>;
}

export function createPdf(setup: PdfSetup): CoilpathPdf {
  const margin = setup.margin ?? 54;
  const doc = new PDFDocument({
    size: 'LETTER',
    margin,
    pdfVersion: '1.7',
    tagged: true,
    lang: setup.lang ?? 'en-US',
    displayTitle: true,
    font: PDF_FONT_FILE,
    info: {
      Title: setup.title,
      ...(setup.subject ? { Subject: setup.subject } : {}),
      Author: 'Coilpath',
      Creator: 'Coilpath',
      Producer: 'Coilpath (pdfkit)',
      ...(setup.createdAt ? { CreationDate: setup.createdAt } : {}),
    },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const root = doc.struct('Document');
  doc.addStructure(root);
  const left = margin;
  const width = doc.page.width - 2 * margin;

  /** Sets size and colour; emphasis fills and strokes the glyphs with a hairline of the same colour. */
  const style = (s: TextStyle, fallbackSize: number): PDFKit.Mixins.TextOptions => {
    const size = s.size ?? fallbackSize;
    const color = s.color ?? pdfInk;
    doc.fontSize(size).fillColor(color);
    if (s.strong) doc.lineWidth(size * 0.028).strokeColor(color);
    return { fill: true, stroke: !!s.strong, ...(s.align ? { align: s.align } : {}) };
  };

  const artifact = (draw: () => void) => {
    doc.markContent('Artifact');
    draw();
    doc.endMarkedContent();
  };

  const ensureSpace = (height: number) => {
    if (doc.y + height > doc.page.height - doc.page.margins.bottom) doc.addPage();
  };

  return {
    doc,
    left,
    width,
    heading(text, level = 2, s = {}) {
      const size = s.size ?? (level === 1 ? 16 : 12);
      ensureSpace(size * 4);
      if (level === 2) doc.moveDown(0.8);
      root.add(
        doc.struct(level === 1 ? 'H1' : 'H2', {}, () => {
          doc.text(text, left, doc.y, { ...style({ ...s, size, strong: true }, size), width });
        }),
      );
      doc.moveDown(level === 1 ? 0.5 : 0.3);
    },
    paragraph(text, s = {}) {
      root.add(
        doc.struct('P', {}, () => {
          if (s.lead) {
            doc.text(s.lead, left, doc.y, { ...style({ ...s, strong: true }, 10), width, continued: true });
            doc.text(text, { ...style({ ...s, strong: false }, 10), stroke: false });
          } else {
            doc.text(text, left, doc.y, { ...style(s, 10), width });
          }
        }),
      );
    },
    list(items, s = {}) {
      if (!items.length) return;
      const l = doc.struct('L');
      root.add(l);
      for (const item of items) {
        ensureSpace((s.size ?? 10) * 1.6);
        const li = doc.struct('LI');
        l.add(li);
        const y = doc.y;
        li.add(doc.struct('Lbl', {}, () => void doc.text('•', left, y, { ...style(s, 10), width: 10 })));
        doc.y = y;
        li.add(doc.struct('LBody', {}, () => void doc.text(item, left + 12, y, { ...style(s, 10), width: width - 12 })));
        li.end();
      }
      l.end();
      doc.x = left;
    },
    table(headers, widths, rows, options = {}) {
      const size = options.size ?? 8.5;
      const total = widths.reduce((a, b) => a + b, 0);
      const w = widths.map((x) => (x / total) * width);
      const align = (i: number) => options.align?.[i] ?? (i === 0 ? 'left' : 'right');
      const table = doc.struct('Table');
      root.add(table);
      const rule = () =>
        artifact(() => {
          doc
            .moveTo(left, doc.y - 1.5)
            .lineTo(left + width, doc.y - 1.5)
            .lineWidth(0.4)
            .strokeColor(ruleColour)
            .stroke();
        });
      /** Draws one row; `tr` null draws it as an artifact (the header repeated on a new page). */
      const drawRow = (cells: string[], header: boolean, tr: PDFKit.PDFStructureElement | null) => {
        const y = doc.y;
        let x = left;
        let h = 0;
        cells.forEach((c, i) => {
          const cw = w[i]!;
          const draw = () => {
            doc.text(c, x + 2, y, { ...style({ size, strong: header }, size), width: cw - 4, align: align(i) });
            h = Math.max(h, doc.y - y);
          };
          // A header cell heads its column (pdfkit writes the Table attribute Scope).
          if (tr)
            tr.add(doc.struct(header ? 'TH' : 'TD', (header ? { scope: 'Column' } : {}) as PDFKit.Mixins.StructureElementOptions, draw));
          else artifact(draw);
          x += cw;
        });
        doc.y = y + h + 3;
        doc.x = left;
        rule();
      };
      const headerRow = () => {
        const tr = doc.struct('TR');
        table.add(tr);
        drawRow(headers, true, tr);
        tr.end();
      };
      ensureSpace(size * 6);
      headerRow();
      for (const r of rows) {
        // Room for this row at its tallest cell.
        const need = Math.max(...r.map((c, i) => doc.fontSize(size).heightOfString(c, { width: w[i]! - 4 }))) + 4;
        if (doc.y + need > doc.page.height - doc.page.margins.bottom) {
          doc.addPage();
          drawRow(headers, true, null);
        }
        const tr = doc.struct('TR');
        table.add(tr);
        drawRow(r, false, tr);
        tr.end();
      }
      table.end();
      if (rows.length === 0 && options.empty) this.paragraph(options.empty, { size: 9, color: pdfSlate });
      doc.x = left;
    },
    ensureSpace,
    artifact,
    figure(alt, draw) {
      root.add(doc.struct('Figure', { alt }, draw));
    },
    finish() {
      root.end();
      doc.end();
      return done;
    },
  };
}
