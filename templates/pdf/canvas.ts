import path from 'node:path';
import PDFDocument from 'pdfkit';
import type { PaperSize } from '../../shared/schemas/digests.schema';
import { hasRightToLeft, visualOrder } from './bidi';
import { colours, fontDir } from './theme';
import { sfntFromWoff } from './woff';

export type FontStyle = 'regular' | 'medium' | 'semibold' | 'bold' | 'heavy' | 'mono' | 'monoBold';

/**
 * @fontsource ships each family as one file per script subset, so a style is a chain of files tried in
 * order for every character, Noto Sans Hebrew and Noto Sans Arabic (same weight) at its end. A character
 * none of them has (Chinese, Japanese and Korean among them) is drawn as a hollow box of the same width
 * class, so a title in a script the fonts lack keeps its place and never breaks the line.
 */
const sansSubsets = ['latin', 'latin-ext', 'cyrillic', 'cyrillic-ext', 'greek', 'vietnamese'];
const monoSubsets = ['latin', 'latin-ext', 'cyrillic', 'cyrillic-ext', 'vietnamese'];
const rightToLeftFamilies = [
  { family: 'noto-sans-hebrew', subset: 'hebrew' },
  { family: 'noto-sans-arabic', subset: 'arabic' },
] as const;

const styleFiles: Record<FontStyle, { family: 'manrope' | 'ibm-plex-mono'; weight: number }> = {
  regular: { family: 'manrope', weight: 400 },
  medium: { family: 'manrope', weight: 500 },
  semibold: { family: 'manrope', weight: 600 },
  bold: { family: 'manrope', weight: 700 },
  heavy: { family: 'manrope', weight: 800 },
  mono: { family: 'ibm-plex-mono', weight: 400 },
  monoBold: { family: 'ibm-plex-mono', weight: 600 },
};

type GlyphFont = { hasGlyphForCodePoint: (cp: number) => boolean };
type Run = { font: string | null; text: string };
export type TextOptions = {
  style?: FontStyle;
  size?: number;
  colour?: string;
  /** Width available; the text is cut with an ellipsis to fit it. */
  width?: number;
  align?: 'left' | 'right' | 'center';
};

export const paperPoints: Record<PaperSize, [number, number]> = {
  A4: [595.28, 841.89],
  LETTER: [612, 792],
};

const ELLIPSIS = '…';
const MARK = /\p{M}/u;

export type PageDecoration = (canvas: Canvas, page: number, pages: number) => void;

/** A pdfkit document with Ballast's fonts, a vertical cursor, measured single-line text and page furniture. */
export class Canvas {
  readonly doc: PDFKit.PDFDocument;
  readonly pageWidth: number;
  readonly pageHeight: number;
  readonly left = 48;
  readonly right: number;
  readonly top = 72;
  readonly bottom: number;
  y: number;
  private readonly chains = new Map<FontStyle, { name: string; font: GlyphFont | null }[]>();
  private readonly runCache = new Map<string, Run[]>();
  private readonly widthCache = new Map<string, number>();
  private readonly chunks: Buffer[] = [];
  private readonly done: Promise<Buffer>;
  /** Drawn on each new page after the first (running header). */
  onNewPage: ((canvas: Canvas) => void) | null = null;

  constructor(paper: PaperSize, info: { title: string; subject: string }) {
    const [w, h] = paperPoints[paper];
    this.pageWidth = w;
    this.pageHeight = h;
    this.right = w - 48;
    this.bottom = h - 56;
    this.doc = new PDFDocument({
      size: [w, h],
      margins: { top: 0, bottom: 0, left: 0, right: 0 },
      bufferPages: true,
      autoFirstPage: true,
      compress: true,
      info: {
        Title: info.title,
        Subject: info.subject,
        Author: 'Ballast',
        Creator: 'Ballast',
        Producer: 'Ballast',
      },
      lang: 'en',
      displayTitle: true,
    });
    this.doc.on('data', (chunk: Buffer) => this.chunks.push(chunk));
    this.done = new Promise((resolve, reject) => {
      this.doc.on('end', () => resolve(Buffer.concat(this.chunks)));
      this.doc.on('error', reject);
    });
    for (const [style, spec] of Object.entries(styleFiles) as [FontStyle, (typeof styleFiles)[FontStyle]][]) {
      const subsets = spec.family === 'manrope' ? sansSubsets : monoSubsets;
      const chain = subsets.map((subset) => {
        const name = `${style}-${subset}`;
        const file = path.join(fontDir(spec.family), `${spec.family}-${subset}-${spec.weight}-normal.woff`);
        this.doc.registerFont(name, sfntFromWoff(file));
        return { name, font: null as GlyphFont | null };
      });
      for (const { family, subset } of rightToLeftFamilies) {
        const name = `${style}-${subset}`;
        this.doc.registerFont(
          name,
          sfntFromWoff(path.join(fontDir(family), `${family}-${subset}-${spec.weight}-normal.woff`)),
        );
        chain.push({ name, font: null });
      }
      this.chains.set(style, chain);
    }
    this.y = this.top;
  }

  get width(): number {
    return this.right - this.left;
  }

  /** Opens a subset file only when a character needs it: decompressing every .woff up front is slow. */
  private glyphs(entry: { name: string; font: GlyphFont | null }): GlyphFont {
    if (!entry.font) {
      this.doc.font(entry.name);
      // pdfkit keeps the fontkit font of an embedded font on `font`; it answers which glyphs exist.
      entry.font = (this.doc as unknown as { _font: { font: GlyphFont } })._font.font;
    }
    return entry.font;
  }

  /** Splits text into runs of one font each; null marks characters no font of the style has. */
  runs(text: string, style: FontStyle): Run[] {
    const key = `${style}\u0000${text}`;
    const cached = this.runCache.get(key);
    if (cached) return cached;
    const chain = this.chains.get(style)!;
    // In a line with Hebrew or Arabic, spaces stand alone so the runs can be put in visual order.
    const bidi = hasRightToLeft(text);
    const runs: Run[] = [];
    for (const ch of text.normalize('NFC')) {
      const cp = ch.codePointAt(0)!;
      let font: string | null;
      const last = runs[runs.length - 1];
      const space = /\s/u.test(ch);
      if (space && bidi) {
        font = chain[0]!.name;
      } else if (space) {
        font = last?.font ?? chain[0]!.name;
        if (font === null) font = chain[0]!.name;
      } else if (MARK.test(ch) && last) {
        font = last.font;
      } else {
        font = chain.find((f) => this.glyphs(f).hasGlyphForCodePoint(cp))?.name ?? null;
      }
      const lastWasSpace = last !== undefined && /^\s+$/u.test(last.text);
      if (last && last.font === font && (!bidi || space === lastWasSpace)) last.text += ch;
      else runs.push({ font, text: ch });
    }
    if (this.runCache.size > 20_000) this.runCache.clear();
    this.runCache.set(key, runs);
    return runs;
  }

  private readonly ascenders = new Map<string, number>();

  /** How far below `y` a run's baseline sits when drawn from the top, in points: its font's ascender. */
  private ascender(font: string, size: number): number {
    let units = this.ascenders.get(font);
    if (units === undefined) {
      this.doc.font(font);
      units = (this.doc as unknown as { _font: { ascender: number } })._font.ascender;
      this.ascenders.set(font, units);
    }
    return (units / 1000) * size;
  }

  private runWidth(run: Run, size: number): number {
    if (run.font === null) return [...run.text].length * size * 0.62;
    this.doc.font(run.font).fontSize(size);
    return this.doc.widthOfString(run.text);
  }

  measure(text: string, style: FontStyle = 'regular', size = 10): number {
    const key = `${style}\u0000${size}\u0000${text}`;
    const cached = this.widthCache.get(key);
    if (cached !== undefined) return cached;
    const width = this.runs(text, style).reduce((sum, run) => sum + this.runWidth(run, size), 0);
    if (this.widthCache.size > 50_000) this.widthCache.clear();
    this.widthCache.set(key, width);
    return width;
  }

  /** The longest start of `text` that fits `width` with an ellipsis, measured in the real fonts. */
  fit(text: string, width: number, style: FontStyle = 'regular', size = 10): string {
    const clean = text.replace(/\s+/g, ' ').trim();
    if (this.measure(clean, style, size) <= width) return clean;
    const chars = [...clean];
    let lo = 0;
    let hi = chars.length;
    while (lo < hi) {
      const mid = Math.ceil((lo + hi) / 2);
      const candidate = chars.slice(0, mid).join('').trimEnd() + ELLIPSIS;
      if (this.measure(candidate, style, size) <= width) lo = mid;
      else hi = mid - 1;
    }
    return chars.slice(0, lo).join('').trimEnd() + ELLIPSIS;
  }

  /** One line of text at (x, y), cut to `width` when given; returns the width drawn. */
  text(value: string, x: number, y: number, options: TextOptions = {}): number {
    const style = options.style ?? 'regular';
    const size = options.size ?? 10;
    const shown = options.width !== undefined ? this.fit(value, options.width, style, size) : value;
    const total = this.measure(shown, style, size);
    let cx = x;
    if (options.width !== undefined && options.align === 'right') cx = x + options.width - total;
    if (options.width !== undefined && options.align === 'center') cx = x + (options.width - total) / 2;
    const colour = options.colour ?? colours.ink;
    const runs = this.runs(shown, style);
    // Every run sits on the baseline of the style's first font, whatever the ascender of its own.
    const baseline = this.ascender(this.chains.get(style)![0]!.name, size);
    for (const run of hasRightToLeft(shown) ? visualOrder(runs) : runs) {
      const w = this.runWidth(run, size);
      if (run.font === null) {
        const box = size * 0.5;
        for (let i = 0; i < [...run.text].length; i += 1) {
          this.doc
            .save()
            .lineWidth(0.6)
            .strokeColor(colour)
            .rect(cx + i * size * 0.62 + size * 0.06, y + size * 0.22, box, size * 0.62)
            .stroke()
            .restore();
        }
      } else {
        const top = y + baseline - this.ascender(run.font, size);
        this.doc.font(run.font).fontSize(size).fillColor(colour).text(run.text, cx, top, {
          lineBreak: false,
          baseline: 'top',
        });
      }
      cx += w;
    }
    return total;
  }

  /** Wraps text on spaces into lines of `width` (a word longer than a line is cut); returns the lines. */
  wrap(value: string, width: number, style: FontStyle = 'regular', size = 10): string[] {
    const lines: string[] = [];
    let current = '';
    for (const word of value.replace(/\s+/g, ' ').trim().split(' ')) {
      const candidate = current ? `${current} ${word}` : word;
      if (this.measure(candidate, style, size) <= width) {
        current = candidate;
        continue;
      }
      if (current) lines.push(current);
      current = this.measure(word, style, size) <= width ? word : this.fit(word, width, style, size);
    }
    if (current) lines.push(current);
    return lines;
  }

  /** A wrapped paragraph at the cursor (or at x); moves the cursor below it and returns its height. */
  paragraph(
    value: string,
    options: TextOptions & { x?: number; lineHeight?: number; maxLines?: number } = {},
  ): number {
    const size = options.size ?? 10;
    const style = options.style ?? 'regular';
    const width = options.width ?? this.width;
    const x = options.x ?? this.left;
    const lineHeight = options.lineHeight ?? size * 1.45;
    let lines = this.wrap(value, width, style, size);
    if (options.maxLines && lines.length > options.maxLines) {
      lines = lines.slice(0, options.maxLines);
      lines[lines.length - 1] = this.fit(`${lines[lines.length - 1]!} …`, width, style, size);
    }
    for (const line of lines) {
      this.ensure(lineHeight);
      this.text(line, x, this.y, { style, size, ...(options.colour ? { colour: options.colour } : {}) });
      this.y += lineHeight;
    }
    return lines.length * lineHeight;
  }

  /** Starts a new page when fewer than `height` points remain; returns whether it did. */
  ensure(height: number): boolean {
    if (this.y + height <= this.bottom) return false;
    this.newPage();
    return true;
  }

  newPage(): void {
    this.doc.addPage({
      size: [this.pageWidth, this.pageHeight],
      margins: { top: 0, bottom: 0, left: 0, right: 0 },
    });
    this.y = this.top;
    this.onNewPage?.(this);
  }

  rect(x: number, y: number, w: number, h: number, fill: string): void {
    this.doc.save().rect(x, y, w, h).fillColor(fill).fill().restore();
  }

  rule(y: number, colour: string = colours.line, x1 = this.left, x2 = this.right, width = 0.6): void {
    this.doc.save().moveTo(x1, y).lineTo(x2, y).lineWidth(width).strokeColor(colour).stroke().restore();
  }

  /** Draws the page furniture on every page, then closes the document. */
  async finish(decorate: PageDecoration): Promise<{ pdf: Buffer; pages: number }> {
    const range = this.doc.bufferedPageRange();
    for (let i = range.start; i < range.start + range.count; i += 1) {
      this.doc.switchToPage(i);
      decorate(this, i - range.start + 1, range.count);
    }
    this.doc.end();
    const pdf = await this.done;
    return { pdf, pages: range.count };
  }
}
