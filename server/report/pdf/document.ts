/**
 * A new briefing PDF: page size and margins of the house layout, document info, the DejaVu fonts registered,
 * a Flow on it, and a promise of the finished bytes. Shared by the transect and landscape briefings.
 */
import PDFDocument from 'pdfkit';
import { TOOL } from '../../version.ts';
import { registerFonts } from './fonts.ts';
import { Flow, type PageBox } from './flow.ts';

export interface BriefingPdfInfo {
  title: string;
  /** One sentence: the question the briefing answers. */
  subject: string;
  scenarioFingerprint: string;
  creationDate?: Date;
}

/** Opens a briefing PDF on `page`; call `pdf.end()` when done and await `bytes`. */
export function openBriefingPdf(page: PageBox, info: BriefingPdfInfo): { pdf: PDFKit.PDFDocument; flow: Flow; bytes: Promise<Buffer> } {
  const pdf = new PDFDocument({
    size: [page.width, page.height],
    margins: { top: page.top, left: page.left, right: page.width - page.right, bottom: page.height - page.bottom },
    bufferPages: true,
    autoFirstPage: true,
    info: {
      Title: info.title,
      Subject: info.subject,
      Author: `${TOOL.name} ${TOOL.version}`,
      Creator: `${TOOL.name} ${TOOL.version}`,
      Producer: `${TOOL.name} (pdfkit)`,
      Keywords: `scenario ${info.scenarioFingerprint}`,
      CreationDate: info.creationDate ?? new Date(),
    },
  });
  const chunks: Buffer[] = [];
  pdf.on('data', (c: Buffer) => chunks.push(c));
  const bytes = new Promise<Buffer>((resolve, reject) => {
    pdf.on('end', () => resolve(Buffer.concat(chunks)));
    pdf.on('error', reject);
  });
  registerFonts(pdf);
  return { pdf, flow: new Flow(pdf, page), bytes };
}
