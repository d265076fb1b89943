// scikit-learn (Debian's python3-sklearn, with python3-numpy) as the reference library for the clustering tests:
// a small Python script reads JSON on stdin and prints JSON. Debian's own interpreter, so a pyenv or virtualenv
// python on PATH cannot hide the system packages.
import { execFileSync } from 'node:child_process';

const PYTHON = '/usr/bin/python3';

const SCRIPT = String.raw`
import json, sys
import numpy as np
from sklearn.cluster import KMeans
from sklearn.metrics import silhouette_score
task = json.load(sys.stdin)
X = np.array(task["points"], dtype=np.float64).reshape(-1, task["dims"])
if task["kind"] == "kmeans":
    init = np.array(task["init"], dtype=np.float64).reshape(-1, task["dims"])
    model = KMeans(n_clusters=init.shape[0], init=init, n_init=1, algorithm="lloyd", tol=1e-4, max_iter=300)
    model.fit(X)
    print(json.dumps({"labels": model.labels_.tolist(), "inertia": float(model.inertia_),
                      "centres": model.cluster_centers_.ravel().tolist(), "iterations": int(model.n_iter_)}))
else:
    print(json.dumps({"silhouette": float(silhouette_score(X, np.array(task["labels"]), metric="euclidean"))}))
`;

export interface SklearnKMeans {
  labels: number[];
  inertia: number;
  centres: number[];
  iterations: number;
}

function runSklearn<T>(task: object): T {
  const output = execFileSync(PYTHON, ['-c', SCRIPT], { input: JSON.stringify(task), maxBuffer: 64 << 20 });
  return JSON.parse(output.toString()) as T;
}

/** `KMeans(init=initial, n_init=1, algorithm="lloyd")` fitted on the points. */
export function sklearnKMeans(points: Float64Array, dims: number, initial: Float64Array): SklearnKMeans {
  return runSklearn({ kind: 'kmeans', points: [...points], dims, init: [...initial] });
}

/** `silhouette_score(X, labels)` with the Euclidean metric. */
export function sklearnSilhouette(points: Float64Array, dims: number, labels: Int32Array): number {
  return runSklearn<{ silhouette: number }>({ kind: 'silhouette', points: [...points], dims, labels: [...labels] })
    .silhouette;
}

const HISTOGRAM_SCRIPT = String.raw`
import json, sys
import numpy as np
task = json.load(sys.stdin)
g = np.array(task["grey"], dtype=np.float64).reshape(task["height"], task["width"])
gx = g[1:-1, 2:] - g[1:-1, :-2]
gy = g[2:, 1:-1] - g[:-2, 1:-1]
magnitude = np.hypot(gx, gy)
angle = np.mod(np.arctan2(gy, gx), np.pi)
counts, _ = np.histogram(angle[magnitude > 0], bins=task["bins"], range=(0, np.pi), weights=magnitude[magnitude > 0])
print(json.dumps((counts / counts.sum()).tolist()))
`;

/** numpy's magnitude-weighted histogram of unsigned gradient orientation (central differences, interior pixels). */
export function numpyOrientationHistogram(grey: Float32Array, width: number, height: number, bins: number): number[] {
  const input = JSON.stringify({ grey: [...grey], width, height, bins });
  return JSON.parse(execFileSync(PYTHON, ['-c', HISTOGRAM_SCRIPT], { input }).toString()) as number[];
}
