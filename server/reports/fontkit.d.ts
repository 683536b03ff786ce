/** The little of fontkit (pdfkit's own font engine) Tideline uses: which glyphs a font file has. */
declare module "fontkit" {
  export function openSync(path: string): { hasGlyphForCodePoint(codePoint: number): boolean };
}
