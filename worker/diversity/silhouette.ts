/**
 * The silhouette of a clustering (Rousseeuw, "Silhouettes: a graphical aid to the interpretation and validation
 * of cluster analysis", J. Comput. Appl. Math. 20, 1987 [M]): for each point, a = mean Euclidean distance to the
 * other points of its cluster, b = the least mean distance to the points of another cluster, s = (b − a) / max(a, b);
 * a point alone in its cluster scores 0, as in scikit-learn's `silhouette_score`. The score is the mean over the
 * points, from −1 to 1; higher means tighter, better separated clusters. O(n² d): callers pass a sample.
 */
export function silhouetteScore(points: Float64Array, dims: number, labels: Int32Array): number {
  const n = labels.length;
  if (points.length !== n * dims) throw new Error(`silhouette: ${points.length} values for ${n} points of ${dims}`);
  let k = 0;
  for (const label of labels) k = Math.max(k, label + 1);
  const sizes = new Float64Array(k);
  for (const label of labels) sizes[label] += 1;
  const used = sizes.filter((size) => size > 0).length;
  if (used < 2 || used >= n) throw new Error(`silhouette: needs 2..${n - 1} clusters, got ${used}`);
  const sums = new Float64Array(k);
  let total = 0;
  for (let i = 0; i < n; i += 1) {
    sums.fill(0);
    for (let j = 0; j < n; j += 1) {
      if (j === i) continue;
      let d = 0;
      for (let t = 0; t < dims; t += 1) {
        const diff = points[i * dims + t]! - points[j * dims + t]!;
        d += diff * diff;
      }
      sums[labels[j]!] += Math.sqrt(d);
    }
    const own = labels[i]!;
    if (sizes[own]! <= 1) continue;
    const a = sums[own]! / (sizes[own]! - 1);
    let b = Infinity;
    for (let c = 0; c < k; c += 1) if (c !== own && sizes[c]! > 0) b = Math.min(b, sums[c]! / sizes[c]!);
    const scale = Math.max(a, b);
    total += scale > 0 ? (b - a) / scale : 0;
  }
  return total / n;
}
