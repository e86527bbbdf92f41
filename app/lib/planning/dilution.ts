// Making up each bench's reactor from the two stocks and water: C1 V1 = C2 V2 for each stock
// (textbook dilution, amount of substance conserved).
export interface MixingVolumes {
  stockAMl: number;
  stockBMl: number;
  /** negative when the stocks alone overfill the reactor */
  waterMl: number;
}

/** V1 = C2 V2 / C1: the volume of stock (C1) that gives concentration C2 in volume V2. */
export function stockVolume(stockMolL: number, targetMolL: number, totalMl: number): number {
  return (targetMolL * totalMl) / stockMolL;
}

export function mixingVolumes(
  bench: { CA0: number; CB0: number },
  session: { reactorVolumeMl: number; stockAMolL: number; stockBMolL: number },
): MixingVolumes {
  const stockAMl = stockVolume(session.stockAMolL, bench.CA0, session.reactorVolumeMl);
  const stockBMl = stockVolume(session.stockBMolL, bench.CB0, session.reactorVolumeMl);
  return { stockAMl, stockBMl, waterMl: session.reactorVolumeMl - stockAMl - stockBMl };
}

export interface PrepTotals {
  stockAMl: number;
  stockBMl: number;
  waterMl: number;
  /** the same with the margin added */
  withMargin: { stockAMl: number; stockBMl: number; waterMl: number };
}

/** Totals over all benches, and with a safety margin in percent for spills and rinsing. */
export function prepTotals(volumes: readonly MixingVolumes[], marginPct: number): PrepTotals {
  const sum = (f: (v: MixingVolumes) => number) => volumes.reduce((s, v) => s + Math.max(0, f(v)), 0);
  const stockAMl = sum((v) => v.stockAMl);
  const stockBMl = sum((v) => v.stockBMl);
  const waterMl = sum((v) => v.waterMl);
  const m = 1 + marginPct / 100;
  return { stockAMl, stockBMl, waterMl, withMargin: { stockAMl: stockAMl * m, stockBMl: stockBMl * m, waterMl: waterMl * m } };
}

/** Sample times in seconds from 0 for the minutes available after set-up. */
export function samplingPlan(samplingIntervalS: number, availableMinutes: number): number[] {
  const out: number[] = [];
  for (let t = 0; t <= availableMinutes * 60 + 1e-9 && out.length < 200; t += samplingIntervalS) out.push(t);
  return out;
}
