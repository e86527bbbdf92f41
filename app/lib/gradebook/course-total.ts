// A student's course total: the weighted mean of their practical marks, in percent.
// Weighted arithmetic mean, sum(w·m) / sum(w) (common practice, no source). A practical with weight
// 0 never counts. Missing work (no mark) is left out of both sums, so it neither helps nor hurts,
// unless the course says missing work counts as zero; then it counts 0, but only once the practical
// is due (closed, released or past its deadline): work not yet due is never a zero.

export interface PracticalForTotal {
  id: number;
  weight: number;
  /** closed, marks released or past the deadline */
  due: boolean;
}

export interface CourseTotal {
  /** percent 0-100, two decimals; null when nothing counts yet */
  total: number | null;
  /** due practicals with no mark */
  missing: number;
  /** the weight that counted, for showing how much of the course the total covers */
  countedWeight: number;
}

export function courseTotal(
  practicals: readonly PracticalForTotal[],
  marks: Readonly<Record<number, number | null | undefined>>,
  missingCountsAsZero: boolean,
): CourseTotal {
  let sum = 0;
  let weight = 0;
  let missing = 0;
  for (const p of practicals) {
    const mark = marks[p.id];
    const has = typeof mark === "number" && Number.isFinite(mark);
    if (!has && p.due) missing++;
    if (!(p.weight > 0)) continue;
    if (has) {
      sum += p.weight * mark;
      weight += p.weight;
    } else if (missingCountsAsZero && p.due) {
      weight += p.weight;
    }
  }
  return { total: weight > 0 ? Math.round((sum / weight) * 100) / 100 : null, missing, countedWeight: weight };
}
