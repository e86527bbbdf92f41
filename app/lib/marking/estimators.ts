// The rate constants a run has, named apart so no screen or export calls two different numbers
// "the straight line": the marking k (the engine's estimate the experiment check uses, and how it
// was made) and the group's own straight line (the unweighted least-squares line of the textbook
// form for the bench's feed, the number the group's reported k is checked against).
import type { FitResult } from "../kinetics/index.ts";
import { handLineCI95, handLineK } from "./engine-result.ts";
import { methodText } from "./feedback.ts";

export const MARKING_K_NAME = "Marking k";
export const OWN_LINE_NAME = "Your straight line";
export const OWN_LINE_STAFF_NAME = "The group's straight line";

/** How the marking k was made, in words. */
export function markingKMethod(fit: Pick<FitResult, "kSource" | "line">): string {
  return fit.kSource === "curve"
    ? "curve fitted to the readings as measured (nonlinear least squares)"
    : `weighted least-squares line of ${methodText(fit.line.form)}, weights from the readings' noise`;
}

/** How the group's own straight line is made, in words (the textbook form for this feed). */
export function ownLineMethod(fit: Pick<FitResult, "line">): string {
  return `unweighted least-squares line of ${methodText(fit.line.form)}, the textbook form for this feed`;
}

export interface OwnLine {
  k: number;
  kCI95: [number, number] | null;
  form: string;
}

/**
 * The group's straight line as shown to anyone: the k the analysis check used when the version
 * was marked (`checks.kLine`), else (a preview, not marked yet) the same pick from the fit. The
 * interval belongs to that line only when the numbers agree.
 */
export function ownLine(fit: FitResult, checkedK: number | null | undefined): OwnLine {
  const fromFit = handLineK(fit);
  const k = typeof checkedK === "number" && Number.isFinite(checkedK) ? checkedK : fromFit;
  return { k, kCI95: k === fromFit ? handLineCI95(fit) : null, form: fit.line.form };
}
