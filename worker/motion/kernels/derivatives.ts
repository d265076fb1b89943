// Image derivatives by central differences, (I(x+1) − I(x−1))/2, with the edge pixel repeated outside the image.
// The usual first-derivative estimate of gradient-based optical flow (Barron, Fleet, Beauchemin, "Performance of
// Optical Flow Techniques", IJCV 12(1), 1994; Bouguet, "Pyramidal Implementation of the Lucas Kanade Feature
// Tracker", Intel, 2000).

/** Writes ∂I/∂x into `dx` and ∂I/∂y into `dy`. */
export function centralDifferences(
  image: Float32Array,
  width: number,
  height: number,
  dx: Float32Array,
  dy: Float32Array,
): void {
  const lastX = width - 1;
  for (let y = 0; y < height; y++) {
    const row = y * width;
    const up = (y > 0 ? y - 1 : 0) * width;
    const down = (y < height - 1 ? y + 1 : y) * width;
    for (let x = 0; x < width; x++) {
      const left = x > 0 ? x - 1 : 0;
      const right = x < lastX ? x + 1 : lastX;
      dx[row + x] = (image[row + right] - image[row + left]) * 0.5;
      dy[row + x] = (image[down + x] - image[up + x]) * 0.5;
    }
  }
}
