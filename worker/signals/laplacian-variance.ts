/**
 * Sharpness as the variance of the Laplacian (Pech-Pacheco, Cristóbal, Chamorro-Martínez, Fernández-Valdivia,
 * "Diatom autofocusing in brightfield microscopy: a comparative study", ICPR 2000), computed as OpenCV practice
 * does: `cv2.Laplacian(grey, CV_64F).var()`.
 *
 * - Kernel: OpenCV's ksize = 1 aperture [[0, 1, 0], [1, −4, 1], [0, 1, 0]].
 * - Borders: OpenCV's default BORDER_REFLECT_101 (…c b | a b c… : the edge pixel is not repeated), so a result
 *   agrees with OpenCV up to float rounding.
 * - Variance: population variance (divide by the pixel count), as numpy `.var()` and `cv::meanStdDev`.
 * The value depends on the image scale: give grey on 0..255 at the working size.
 */

/** Variance of the 4-neighbour Laplacian of a grey image stored row by row. */
export function laplacianVariance(grey: Float32Array, width: number, height: number): number {
  if (
    !Number.isInteger(width) ||
    !Number.isInteger(height) ||
    width < 1 ||
    height < 1 ||
    grey.length !== width * height
  ) {
    throw new RangeError(`grey buffer of ${grey.length} values does not match ${width}×${height}`);
  }
  let sum = 0;
  let sumSquares = 0;
  for (let y = 0; y < height; y += 1) {
    const row = y * width;
    const above = reflect101(y - 1, height) * width;
    const below = reflect101(y + 1, height) * width;
    for (let x = 0; x < width; x += 1) {
      const left = reflect101(x - 1, width);
      const right = reflect101(x + 1, width);
      const lap = grey[above + x] + grey[below + x] + grey[row + left] + grey[row + right] - 4 * grey[row + x];
      sum += lap;
      sumSquares += lap * lap;
    }
  }
  const count = width * height;
  const mean = sum / count;
  return Math.max(0, sumSquares / count - mean * mean);
}

/** Index one step outside 0..n−1 mirrored without repeating the edge (BORDER_REFLECT_101). */
function reflect101(i: number, n: number): number {
  if (n === 1) return 0;
  if (i < 0) return -i;
  if (i >= n) return 2 * n - 2 - i;
  return i;
}
