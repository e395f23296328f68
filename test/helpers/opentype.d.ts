// The part of opentype.js (a general-purpose font parser from the registry, the tests' reference for font
// tables) that the tests use; the package ships no type declarations.
declare module "opentype.js" {
  interface Glyph {
    readonly index: number;
    readonly advanceWidth?: number;
  }
  interface Font {
    readonly unitsPerEm: number;
    readonly tables: Record<string, unknown>;
    charToGlyph(ch: string): Glyph;
  }
  const opentype: { parse(buffer: ArrayBuffer): Font };
  export default opentype;
}
