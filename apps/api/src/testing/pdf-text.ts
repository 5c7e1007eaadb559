/**
 * Reads a PDF the way a viewer or a screen reader would, with a general-purpose reader (pdfjs-dist),
 * not with the code that wrote it: the text of every page, the document info, the catalog's
 * accessibility entries and the structure tree.
 */
import { getDocument, OPS } from 'pdfjs-dist/legacy/build/pdf.mjs';

export interface StructNode {
  role?: string;
  type?: string;
  children?: StructNode[];
}

export interface PdfReading {
  pages: number;
  /** Every page's text, lines joined with "\n" and runs within a line with nothing in between. */
  text: string;
  /** The same text with all white space collapsed to single spaces (wrapped lines rejoined). */
  flat: string;
  title: string | undefined;
  language: string | undefined;
  marked: boolean;
  displayDocTitle: boolean;
  /**
   * Structure roles in reading order (depth first), e.g. Root, Document, H1, P, Table, TR, TH… as
   * pdfjs gives the tree with the first page (the whole tree of the elements above that page's content).
   */
  roles: string[];
  /** Page by page, the roles of the elements that hold marked content on that page (an artifact holds none). */
  contentRoles: string[];
}

export async function readPdf(bytes: Buffer | Uint8Array): Promise<PdfReading> {
  const pdf = await getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, isEvalSupported: false, verbosity: 0 }).promise;
  try {
    let text = '';
    const roles: string[] = [];
    const contentRoles: string[] = [];
    const walk = (n: StructNode | null | undefined, into: string[] | null) => {
      if (!n) return;
      if (n.role) {
        into?.push(n.role);
        if (n.children?.some((c) => c.type === 'content')) contentRoles.push(n.role);
      }
      for (const c of n.children ?? []) walk(c, into);
    };
    for (let i = 1; i <= pdf.numPages; i++) {
      const page = await pdf.getPage(i);
      const content = await page.getTextContent();
      for (const item of content.items) {
        if (!('str' in item)) continue;
        text += item.str + (item.hasEOL ? '\n' : '');
      }
      text += '\n';
      walk((await page.getStructTree()) as StructNode | null, i === 1 ? roles : null);
    }
    const meta = await pdf.getMetadata();
    const info = meta.info as { Title?: string; Language?: string };
    const markInfo = (await pdf.getMarkInfo()) as { Marked?: boolean } | null;
    const prefs = (await pdf.getViewerPreferences()) as { DisplayDocTitle?: boolean } | null;
    return {
      pages: pdf.numPages,
      text,
      flat: text.replace(/\s+/g, ' ').trim(),
      title: info.Title,
      language: info.Language,
      marked: markInfo?.Marked === true,
      displayDocTitle: prefs?.DisplayDocTitle === true,
      roles,
      contentRoles,
    };
  } finally {
    await pdf.destroy();
  }
}

/** The names of the fonts a PDF embeds (FontFile/FontFile2/FontFile3) and refers to, read from its objects. */
export function pdfFontNames(bytes: Buffer): string[] {
  const raw = bytes.toString('latin1');
  return [...new Set([...raw.matchAll(/\/BaseFont\s*\/([A-Za-z0-9+_-]+)/g)].map((m) => m[1]!))];
}

/** How many images the PDF paints (pdfjs-dist's operator list: `paintImageXObject` and inline images), page by page summed. */
export async function pdfImageCount(bytes: Buffer | Uint8Array): Promise<number> {
  const pdf = await getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, isEvalSupported: false, verbosity: 0 }).promise;
  try {
    const paints = new Set<number>([OPS.paintImageXObject, OPS.paintInlineImageXObject, OPS.paintImageXObjectRepeat]);
    let n = 0;
    for (let i = 1; i <= pdf.numPages; i++) {
      const ops = await (await pdf.getPage(i)).getOperatorList();
      n += ops.fnArray.filter((f) => paints.has(f)).length;
    }
    return n;
  } finally {
    await pdf.destroy();
  }
}
