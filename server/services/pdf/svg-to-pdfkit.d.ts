// svg-to-pdfkit 0.1.8 ships no types; the subset the bulletin PDF uses.
declare module 'svg-to-pdfkit' {
  type SvgToPdfOptions = {
    width?: number;
    height?: number;
    preserveAspectRatio?: string;
    assumePt?: boolean;
    precision?: number;
    warningCallback?: (message: string) => void;
    fontCallback?: (family: string, bold: boolean, italic: boolean, fontOptions: { fauxItalic: boolean; fauxBold: boolean }) => string;
  };
  function SVGtoPDF(doc: PDFKit.PDFDocument, svg: string, x: number, y: number, options?: SvgToPdfOptions): void;
  export default SVGtoPDF;
}
