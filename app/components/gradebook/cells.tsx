// Small cell pieces shared by the two gradebooks, in the app's number style (app/lib/format.ts).
import { distinctDigits, sig } from "~/lib/format";

/** A value that is not there: a dash on screen, the reason for screen readers. */
export function Missing({ reason, note }: { reason: string; note?: string }) {
  return (
    <span className="text-ink-soft">
      <span aria-hidden="true">—</span>
      {note ? <span aria-hidden="true" className="ml-1 text-sm">{note}</span> : null}
      <span className="sr-only">{reason}</span>
    </span>
  );
}

/** "70 %", "26.67 %"; a percentage of the practical's (or course's) marks. */
export function percentText(x: number): string {
  return `${sig(x, 4)} %`;
}

/** A signed percentage: "+3.5 %", "−99.9 %". */
export function signedPercentText(x: number): string {
  return `${x > 0 ? "+" : ""}${sig(x, 3)} %`;
}

/** A fitted k and its 95 % interval, with digits enough for the three to differ. */
export function KWithInterval({ k, ci }: { k: number; ci: [number, number] | null }) {
  if (!ci) return <span>{sig(k, 3)}</span>;
  const d = distinctDigits([k, ci[0], ci[1]], 3);
  return (
    <span>
      {sig(k, d, true)}
      <span className="block text-sm text-ink-soft">95 % CI {sig(ci[0], d, true)} to {sig(ci[1], d, true)}</span>
    </span>
  );
}
