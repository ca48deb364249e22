// pdf-parse's entry file reads a test PDF when loaded without a parent module; its library file does
// not. Typed for a Uint8Array, which its bundled pdf.js reads correctly (a Buffer it misreads).
declare module "pdf-parse/lib/pdf-parse.js" {
  export default function pdfParse(data: Uint8Array): Promise<{ text: string; numpages: number }>;
}
