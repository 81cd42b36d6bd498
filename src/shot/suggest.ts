// "did you mean" hints for misspelt keys and values.

/**
 * Optimal-string-alignment distance: insertions, deletions, substitutions and swaps of two
 * neighbouring letters each cost 1 (a swap is the commonest typo: "widht").
 */
export function editDistance(a: string, b: string): number {
  const rows = a.length + 1;
  const cols = b.length + 1;
  const d: number[][] = Array.from({ length: rows }, (_, i) => Array.from({ length: cols }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i < rows; i++) {
    for (let j = 1; j < cols; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.length][b.length];
}

/** The closest candidate within a distance that still reads as a typo, or undefined. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  const w = word.toLowerCase().replace(/[-_ ]/g, '');
  let best: string | undefined;
  let bestDist = Infinity;
  for (const c of candidates) {
    const d = editDistance(w, c.toLowerCase().replace(/[-_ ]/g, ''));
    if (d < bestDist) {
      best = c;
      bestDist = d;
    }
  }
  const allowed = Math.max(1, Math.floor(word.length / 3));
  return bestDist <= allowed ? best : undefined;
}
