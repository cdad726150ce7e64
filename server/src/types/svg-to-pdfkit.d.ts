// svg-to-pdfkit 0.1.8 ships no types; this covers the one call the evaluation report makes.
declare module 'svg-to-pdfkit' {
  interface SvgToPdfOptions {
    width?: number;
    height?: number;
    preserveAspectRatio?: string;
    /** Whether SVG units are points (the default treats them as pixels). */
    assumePt?: boolean;
    warningCallback?: (message: string) => void;
  }
  function SVGtoPDF(
    doc: PDFKit.PDFDocument,
    svg: string,
    x: number,
    y: number,
    options?: SvgToPdfOptions,
  ): void;
  export = SVGtoPDF;
}
