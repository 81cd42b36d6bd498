// Premultiplied scene-linear float RGBA images. Transfer curves and quantising live in io/ only.

export class FloatImage {
  /** RGBA, row-major from the top-left pixel, premultiplied, scene-linear Rec.709 */
  readonly data: Float32Array;

  constructor(
    readonly width: number,
    readonly height: number,
    data?: Float32Array,
  ) {
    if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
      throw new RangeError(`image size must be positive whole numbers, got ${width}x${height}`);
    }
    if (data && data.length !== width * height * 4) {
      throw new RangeError(`image data holds ${data.length} floats; ${width}x${height} RGBA needs ${width * height * 4}`);
    }
    this.data = data ?? new Float32Array(width * height * 4);
  }

  /** Sum of each channel over the image (float64 accumulation). */
  channelSums(): [number, number, number, number] {
    const s = [0, 0, 0, 0] as [number, number, number, number];
    const d = this.data;
    for (let i = 0; i < d.length; i += 4) {
      s[0] += d[i];
      s[1] += d[i + 1];
      s[2] += d[i + 2];
      s[3] += d[i + 3];
    }
    return s;
  }
}
