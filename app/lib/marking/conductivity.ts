// A conductivity run as the group measured it: where S0 and S∞ come from, and which rows are
// readings of the run. S∞ is a row marked as the final reading (∞, inf, final), else a reading
// taken long after the others ("next morning"), else the final conductivity the practical
// stores, else it is fitted with k. Such a final reading is kept out of the run's readings (and so
// out of the straight line). S0 is the reading at mixing when there is one; when the first reading
// came after mixing, S0 is fitted (kinetics/signalStart.ts), never taken from that reading.

export interface FinalRow {
  row: number;
  value: number;
  label: string;
}

export interface SignalPlan {
  points: [number, number][];
  rowNumbers: number[];
  S0: number;
  Sinf?: number;
  /** S0 is a parameter of the curve fit */
  fitStart: boolean;
  notes: string[];
}

/** a reading this many median spacings after the one before it, and 3 times its time, was taken after the run */
const LATE_GAP_SPACINGS = 10;
const LATE_TIME_FACTOR = 3;

const fmt = (x: number) => Number(x.toPrecision(4)).toString();

/** The index of a reading taken long after the run (the last one), or -1. */
export function lateReading(points: readonly [number, number][]): number {
  if (points.length < 6) return -1;
  const order = points.map((_, i) => i).sort((a, b) => points[a][0] - points[b][0]);
  const last = order[order.length - 1];
  const before = order[order.length - 2];
  const gaps: number[] = [];
  for (let i = 1; i < order.length - 1; i++) gaps.push(points[order[i]][0] - points[order[i - 1]][0]);
  gaps.sort((a, b) => a - b);
  const median = gaps[Math.floor(gaps.length / 2)];
  const gap = points[last][0] - points[before][0];
  return median > 0 && gap > LATE_GAP_SPACINGS * median && points[last][0] > LATE_TIME_FACTOR * points[before][0] ? last : -1;
}

export function signalPlan(
  points: [number, number][],
  rowNumbers: number[],
  final: FinalRow | undefined,
  storedEnd: number | undefined,
  timeUnit: string,
): SignalPlan {
  const notes: string[] = [];
  let pts = points;
  let rows = rowNumbers;
  let Sinf: number | undefined;
  if (final) {
    Sinf = final.value;
    notes.push(`Row ${final.row} ("${final.label}") is the final reading: S∞ = ${fmt(final.value)}, kept out of the straight line.`);
  } else {
    const late = lateReading(points);
    if (late >= 0) {
      Sinf = points[late][1];
      const others = points.filter((_, i) => i !== late);
      const lastOther = Math.max(...others.map((p) => p[0]));
      notes.push(
        `Row ${rowNumbers[late]}, at ${fmt(points[late][0])} ${timeUnit}, was taken long after the other readings (the last at ${fmt(lastOther)} ${timeUnit}): it is read as the final reading, S∞ = ${fmt(Sinf)}, and kept out of the straight line.`,
      );
      pts = others;
      rows = rowNumbers.filter((_, i) => i !== late);
    } else if (storedEnd !== undefined) {
      Sinf = storedEnd;
      notes.push(`No final reading in the file: S∞ = ${fmt(storedEnd)}, the final conductivity the practical stores.`);
    } else {
      notes.push("No final reading in the file and none stored for the practical: S∞ is fitted with k.");
    }
  }
  let first = 0;
  pts.forEach((p, i) => (p[0] < pts[first][0] ? (first = i) : 0));
  const firstTime = pts[first]?.[0] ?? 0;
  const fitStart = firstTime > 0;
  if (fitStart) notes.push(`The first reading (row ${rows[first]}) came ${fmt(firstTime)} ${timeUnit} after mixing: the start value S0 is fitted with k, not taken from that reading.`);
  return { points: pts, rowNumbers: rows, S0: pts[first]?.[1] ?? NaN, ...(Sinf !== undefined ? { Sinf } : {}), fitStart, notes };
}
