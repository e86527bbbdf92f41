// Getting through a review queue: why a version is flagged, in a word, and where "previous",
// "next" and "next flagged" lead from one version. Pure; the queue page and the review page use it.

/** One word (or two) per reason a version sits among the flagged, most telling first. */
const REASON_WORD: Array<[string, string]> = [
  ["failed", "failed"],
  ["refused", "refused"],
  ["unit-slip", "units"],
  ["feed-mismatch", "feed"],
  ["wrong-line-form", "line form"],
  ["outlier", "wild reading"],
  ["time-order", "times"],
  ["order-mismatch", "rate law"],
  ["curvature", "curvature"],
  ["fits-disagree", "imprecise"],
  ["straight-line-bias", "hand line"],
  ["beyond-asymptote", "past limit"],
  ["low-conversion", "short run"],
  ["few-points", "few readings"],
  ["fit-not-converged", "no change"],
];

/** The reasons in a word each, most telling first (unknown codes keep their code). */
export function flaggedWords(status: string, flagCodes: readonly string[]): string[] {
  const codes = new Set<string>(flagCodes);
  if (status === "failed" || status === "refused") codes.add(status);
  const known = REASON_WORD.filter(([c]) => codes.has(c)).map(([, w]) => w);
  const unknown = [...codes].filter((c) => !REASON_WORD.some(([k]) => k === c));
  return [...known, ...unknown];
}

export interface QueueStop {
  id: number;
  group: string;
  flagged: boolean;
}

export interface QueueNeighbours {
  previous: QueueStop | null;
  next: QueueStop | null;
  nextFlagged: QueueStop | null;
  previousFlagged: QueueStop | null;
  /** 1-based place in the queue and its length */
  position: number;
  of: number;
}

/**
 * Neighbours of version `id` in the queue's order (bench order, each group's latest version).
 * "Next flagged" is the first flagged version after this one, wrapping round to the start, so a
 * reviewer who opened the queue in the middle still reaches every flagged version.
 */
export function neighbours(stops: readonly QueueStop[], id: number): QueueNeighbours {
  const i = stops.findIndex((s) => s.id === id);
  const n = stops.length;
  if (i < 0) return { previous: null, next: null, nextFlagged: stops.find((s) => s.flagged) ?? null, previousFlagged: null, position: 0, of: n };
  let nextFlagged: QueueStop | null = null;
  let previousFlagged: QueueStop | null = null;
  for (let step = 1; step < n; step++) {
    const s = stops[(i + step) % n];
    if (s.flagged) { nextFlagged = s; break; }
  }
  for (let step = 1; step < n; step++) {
    const s = stops[(i - step + n) % n];
    if (s.flagged) { previousFlagged = s; break; }
  }
  return { previous: i > 0 ? stops[i - 1] : null, next: i < n - 1 ? stops[i + 1] : null, nextFlagged, previousFlagged, position: i + 1, of: n };
}
