import { extractText, getDocumentProxy } from 'unpdf';

/** supertest parser: the answer's body as one Buffer (a PDF, an image). */
// superagent hands the raw Node response, though its types say Response.
export function binary(res: any, cb: (err: Error | null, body: Buffer) => void): void {
  const stream = res as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(Buffer.from(c)));
  stream.on('end', () => cb(null, Buffer.concat(chunks)));
}

/** The words a PDF shows, read with pdf.js (unpdf): the pages' text joined, runs of space made one. */
export async function pdfText(pdf: Buffer): Promise<string> {
  const doc = await getDocumentProxy(new Uint8Array(pdf));
  const { text } = await extractText(doc, { mergePages: true });
  return text.replace(/\s+/g, ' ');
}

/** The number of pages of a PDF. */
export async function pdfPages(pdf: Buffer): Promise<number> {
  return (await getDocumentProxy(new Uint8Array(pdf))).numPages;
}
