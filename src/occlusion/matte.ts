// What occlusion reads of a matte frame: one channel, in the file's own range. Files are decoded
// in io/ (matte-read.ts); occlusion sees only this.

/** One channel of a matte frame, row-major from the top-left, values in the file's own range. */
export interface MatteImage {
  width: number;
  height: number;
  values: Float32Array;
}
