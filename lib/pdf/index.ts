/** Gridproof's PDFs: the printable reference target and the report export. */
export { renderTargetPdf, renderTargetPdfWithLayout, targetPdfFilename, TargetPdfOptionsSchema, TargetPdfQuerySchema, TARGET_PAPERS, TARGET_SIZES, TARGET_SIZE_MM, type TargetSize, type TargetPdfOptions, type TargetLayout } from './target';
export { renderReportPdf, type ReportPdfOptions, type ReportPdfComment } from './report';
export { PAPERS, PAPER_MM, PAPER_NAME, mmToPt, ptToMm, type Paper } from './units';
