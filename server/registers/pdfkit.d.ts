// pdfkit ships no types (and @types/pdfkit is not installed): the subset the register PDF uses.
declare module 'pdfkit' {
  interface TextOptions {
    width?: number;
    height?: number;
    align?: 'left' | 'right' | 'center' | 'justify';
    lineBreak?: boolean;
    ellipsis?: boolean | string;
  }
  interface PdfPage {
    width: number;
    height: number;
    margins: { top: number; bottom: number; left: number; right: number };
  }
  interface DocumentOptions {
    size?: string | [number, number];
    layout?: 'portrait' | 'landscape';
    margin?: number;
    margins?: { top: number; bottom: number; left: number; right: number };
    bufferPages?: boolean;
    autoFirstPage?: boolean;
    info?: Record<string, string>;
  }
  class PDFDocument {
    constructor(options?: DocumentOptions);
    page: PdfPage;
    x: number;
    y: number;
    on(event: 'data', listener: (chunk: Buffer) => void): this;
    on(event: 'end' | 'pageAdded', listener: () => void): this;
    on(event: 'error', listener: (err: Error) => void): this;
    registerFont(name: string, src: string | Buffer): this;
    font(name: string): this;
    fontSize(size: number): this;
    fillColor(color: string): this;
    strokeColor(color: string): this;
    lineWidth(width: number): this;
    text(text: string, x?: number, y?: number, options?: TextOptions): this;
    widthOfString(text: string, options?: TextOptions): number;
    heightOfString(text: string, options?: TextOptions): number;
    /** Height of one line in the current font and size; with `includeGap`, the line gap too. */
    currentLineHeight(includeGap?: boolean): number;
    moveDown(lines?: number): this;
    moveTo(x: number, y: number): this;
    lineTo(x: number, y: number): this;
    stroke(): this;
    addPage(options?: DocumentOptions): this;
    switchToPage(n: number): this;
    bufferedPageRange(): { start: number; count: number };
    end(): void;
  }
  export default PDFDocument;
}
