// A 5x7 pixel font for frame numbers and timecodes on review images: digits, ':', ';', '-', '+'
// and space, drawn here by hand (a font library would bring a rasteriser and a font file for eleven
// glyphs). Each glyph is seven rows of five bits, most significant bit on the left.

export const GLYPHS: Readonly<Record<string, readonly number[]>> = {
  '0': [0b01110, 0b10001, 0b10011, 0b10101, 0b11001, 0b10001, 0b01110],
  '1': [0b00100, 0b01100, 0b00100, 0b00100, 0b00100, 0b00100, 0b01110],
  '2': [0b01110, 0b10001, 0b00001, 0b00010, 0b00100, 0b01000, 0b11111],
  '3': [0b11110, 0b00001, 0b00001, 0b01110, 0b00001, 0b00001, 0b11110],
  '4': [0b00010, 0b00110, 0b01010, 0b10010, 0b11111, 0b00010, 0b00010],
  '5': [0b11111, 0b10000, 0b11110, 0b00001, 0b00001, 0b10001, 0b01110],
  '6': [0b00110, 0b01000, 0b10000, 0b11110, 0b10001, 0b10001, 0b01110],
  '7': [0b11111, 0b00001, 0b00010, 0b00100, 0b01000, 0b01000, 0b01000],
  '8': [0b01110, 0b10001, 0b10001, 0b01110, 0b10001, 0b10001, 0b01110],
  '9': [0b01110, 0b10001, 0b10001, 0b01111, 0b00001, 0b00010, 0b01100],
  ':': [0b00000, 0b00100, 0b00100, 0b00000, 0b00100, 0b00100, 0b00000],
  ';': [0b00000, 0b00100, 0b00100, 0b00000, 0b00100, 0b00100, 0b01000],
  '-': [0b00000, 0b00000, 0b00000, 0b11111, 0b00000, 0b00000, 0b00000],
  '+': [0b00000, 0b00100, 0b00100, 0b11111, 0b00100, 0b00100, 0b00000],
  ' ': [0, 0, 0, 0, 0, 0, 0],
};

export const GLYPH_W = 5;
export const GLYPH_H = 7;

/** Width in pixels of `text` at `scale` (one blank column between glyphs). */
export function textWidth(text: string, scale: number): number {
  return text.length === 0 ? 0 : (text.length * (GLYPH_W + 1) - 1) * scale;
}

/**
 * Draw `text` with its top-left at (x, y), each font pixel a scale x scale block, calling
 * `plot(px, py)` for every lit pixel (the caller clips and colours).
 */
export function drawText(text: string, x: number, y: number, scale: number, plot: (px: number, py: number) => void): void {
  let cx = x;
  for (const ch of text) {
    const g = GLYPHS[ch];
    if (!g) throw new Error(`the review font has no glyph for "${ch}"`);
    for (let row = 0; row < GLYPH_H; row++) {
      for (let col = 0; col < GLYPH_W; col++) {
        if (!(g[row] & (1 << (GLYPH_W - 1 - col)))) continue;
        for (let dy = 0; dy < scale; dy++) for (let dx = 0; dx < scale; dx++) plot(cx + col * scale + dx, y + row * scale + dy);
      }
    }
    cx += (GLYPH_W + 1) * scale;
  }
}
