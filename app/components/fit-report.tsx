// What the engine found for one run: k with its 95 % interval, the reference comparison,
// flags with the pasted lines they concern, the order comparison and two plots.
import type { FitResult } from "~/lib/kinetics";
import type { MeasuredKind } from "~/lib/fit-form";
import { distinctDigits, modelText, sig, styleNumbers, unitText, withInterval } from "~/lib/format";
import { XYPlot } from "./xy-plot";
import { TableBox } from "./page";
import { FLAG_TITLE } from "~/lib/marking/flag-titles";


function measuredLabel(kind: MeasuredKind, concentrationUnit: string) {
  switch (kind) {
    case "concentrationA": return `CA / (${concentrationUnit})`;
    case "concentrationB": return `CB / (${concentrationUnit})`;
    case "conversionA": return "conversion of A (–)";
    case "signal": return "signal (units as entered)";
    case "absorbance": return "absorbance (–)";
  }
}

function residualLabel(kind: MeasuredKind, concentrationUnit: string) {
  if (kind === "concentrationA" || kind === "concentrationB") return `residual / (${concentrationUnit})`;
  if (kind === "signal") return "residual (signal units)";
  return "residual (–)";
}

/** A formula as written by the engine, in the screen's style (true minus, multiplication dot). */
function formulaText(text: string) {
  return styleNumbers(text.replace(/ - /g, " − ").replace(/\*/g, "·"));
}

type Flag = FitResult["flags"][number];

/**
 * A flag's message in the screen's number style. The engine writes the k values it compares with
 * three figures; where they would print alike, they get the digits that tell them apart.
 */
function flagText(f: Flag, result: FitResult): string {
  const compared: Partial<Record<string, number[]>> = {
    "straight-line-bias": [result.line.k, result.k, result.line.k],
    "fits-disagree": [result.weightedLine.k, result.nonlinear.k, f.prefer === "curve" ? result.nonlinear.k : result.weightedLine.k],
  };
  let message = f.message;
  const values = compared[f.code];
  if (values && values.every(Number.isFinite)) {
    const d = distinctDigits(values, 3);
    let i = 0;
    message = message.replace(/-?\d+(?:\.\d+)?(?:e[+-]?\d+)?/g, (token) => {
      if (i < values.length && token === values[i].toPrecision(3)) return sig(values[i++], d, true);
      return token;
    });
  }
  return styleNumbers(message);
}

interface Props {
  result: FitResult;
  kind: MeasuredKind;
  /** the readings as sent, [time, value] in the request's units */
  points: Array<[number, number]>;
  /** pasted line of each reading, to name lines in flags */
  lines: number[];
}

export function FitReport({ result, kind, points, lines }: Props) {
  const lineOf = (row: number) => lines[row] ?? row + 1;
  const timeUnit = result.units.time;
  const perMinute = timeUnit === "min";
  const ref = result.reference;
  // Nothing to report without usable readings: say so, and show no numbers, verdict or best law.
  if (!(result.n >= 2) || !Number.isFinite(result.k)) {
    return (
      <section aria-labelledby="result-h" className="mt-8 rounded border border-bad bg-bad-soft p-4">
        <h2 id="result-h" className="text-2xl font-bold">No result</h2>
        <p className="mt-1">
          None of the readings could be used for the fit{result.n ? ` (${result.n} usable)` : ""}, so there is no k, no comparison with the reference and no best rate law.
          {result.flags.length ? " What the engine found:" : " Check the measured quantity, the feed and the readings."}
        </p>
        {result.flags.length ? (
          <ul className="mt-2 list-disc pl-6">
            {result.flags.map((f) => <li key={f.code}>{flagText(f, result)}</li>)}
          </ul>
        ) : null}
      </section>
    );
  }
  return (
    <section aria-labelledby="result-h" className="mt-8 rounded border border-rule bg-white p-4">
      <h2 id="result-h" className="text-2xl font-bold">Result</h2>
      <p className="mt-1 text-ink-soft">
        Model: <strong className="text-ink">{modelText(result.model)}</strong>; straight line {formulaText(result.line.form)} against t.
        k is defined on A: −dCA/dt = k·CA{result.model.startsWith("second-order-AB") ? "·CB" : result.model === "second-order-A" ? "²" : ""}. Limiting reagent {result.limitingReagent}.
      </p>
      {/* A list rather than a table: on a phone each value goes under its name instead of squeezing beside it. */}
      <dl className="mt-4 grid gap-x-6 border-t border-rule sm:grid-cols-[minmax(0,18rem)_1fr]">
        <Row name={`k, ${result.kSource === "curve" ? "curve fit" : "weighted straight-line fit"} (used for marking)`}>
          {withInterval(result.k, result.kCI95)} {unitText(result.kUnit)}
          {perMinute ? <span className="block text-ink-soft">= {sig(result.k * 60)} {unitText(result.kUnit, true)}</span> : null}
        </Row>
        <Row name="k, curve fit to the readings">
          {withInterval(result.nonlinear.k, result.nonlinear.kCI95)} {unitText(result.kUnit)}
          {perMinute ? <span className="block text-ink-soft">= {sig(result.nonlinear.k * 60)} {unitText(result.kUnit, true)}</span> : null}
        </Row>
        <Row name="k, unweighted line (hand method)">{withInterval(result.line.k, result.line.kCI95)} {unitText(result.kUnit)}</Row>
        {result.nonlinear.Sinf ? <Row name="Final signal S∞ (fitted)">{withInterval(result.nonlinear.Sinf.value, result.nonlinear.Sinf.ci95)}</Row> : null}
        <Row name="R² of the straight line">{sig(result.r2, 5)}</Row>
        <Row name="Points used">{result.n}</Row>
        <Row name="Start-time offset implied by the intercept">{sig(result.line.timeOffset, 3)} {timeUnit}</Row>
        <Row name="Limiting reagent reacted by the last reading">{sig(result.fractionReacted * 100, 3)} %</Row>
      </dl>

      {ref ? (
        <p className={`mt-4 rounded border-l-4 px-4 py-2 ${ref.withinTolerance ? "border-good" : "border-bad bg-bad-soft"}`}>
          <strong>{ref.withinTolerance ? "✓ Within tolerance" : "✕ Outside tolerance"}</strong>: reference k at{" "}
          {ref.temperatureK ? `${sig(ref.temperatureK - 273.15, 4)} °C` : "the run temperature"} is {sig(ref.kAtT)} {unitText(result.kUnit)}; the
          marking k differs by {sig(ref.deviationPct, 3)} % (tolerance ±{sig(ref.tolerancePct, 3)} %).
        </p>
      ) : null}

      <h3 className="mt-6 text-lg font-bold">Things to look at</h3>
      {result.flags.length === 0 ? (
        <p>None found.</p>
      ) : (
        <ul className="mt-2 space-y-2">
          {result.flags.map((f) => (
            <li key={f.code} className="rounded border-l-4 border-warn bg-warn-soft px-3 py-2">
              <span className="font-bold"><span aria-hidden="true">⚠ </span>{FLAG_TITLE[f.code] ?? f.code}</span>: {flagText(f, result)}
              {f.rows.length ? <span className="text-ink-soft"> (lines {f.rows.slice(0, 12).map(lineOf).join(", ")}{f.rows.length > 12 ? ", …" : ""})</span> : null}
            </li>
          ))}
        </ul>
      )}

      {result.orderComparison ? (
        <>
          <h3 className="mt-6 text-lg font-bold">Which rate law describes the readings best</h3>
          <div className="mt-2">
          <TableBox label="Rate laws compared">
          <table className="border-collapse text-left">
            <thead>
              <tr className="border-b-2 border-ink"><th className="px-2 py-1 pr-6">Rate law</th><th className="num py-1 pr-6">k (per second)</th><th className="num py-1 pr-6">Residual SD</th><th className="py-1">Residuals bend?</th></tr>
            </thead>
            <tbody>
              {result.orderComparison.laws.map((l) => (
                <tr key={l.model} className="border-b border-rule">
                  <td className="py-1 pr-6">{modelText(l.model)}{l.model === result.orderComparison!.best ? <strong> (best)</strong> : ""}</td>
                  <td className="num py-1 pr-6">{sig(l.k)} {unitText(l.kUnit)}</td>
                  <td className="num py-1 pr-6">{sig(l.residualStdDev, 3)}</td>
                  <td className="py-1">{l.curved ? "yes" : "no"}</td>
                </tr>
              ))}
            </tbody>
          </table>
          </TableBox>
          </div>
        </>
      ) : null}

      <ReadingsPlots result={result} kind={kind} points={points} />
    </section>
  );
}

function Row({ name, children }: { name: string; children: React.ReactNode }) {
  return (
    <>
      <dt className="pt-2 font-bold sm:border-b sm:border-rule sm:py-1">{name}</dt>
      <dd className="border-b border-rule pb-2 tabular-nums sm:py-1">{children}</dd>
    </>
  );
}

function ReadingsPlots({ result, kind, points }: Pick<Props, "result" | "kind" | "points">) {
  const t = result.curve.t;
  const label = measuredLabel(kind, result.units.concentration);
  const timeLabel = `time / ${result.units.time}`;
  return (
    <>
      <XYPlot
        title="Readings against time with the fitted model"
        xLabel={timeLabel}
        yLabel={label}
        points={points}
        curve={t.map((x, i) => [x, result.curve.value[i]])}
      />
      <XYPlot
        title="Residuals of the curve fit (reading minus model)"
        xLabel={timeLabel}
        yLabel={residualLabel(kind, result.units.concentration)}
        points={points.map(([x], i) => [x, result.nonlinear.residuals[i]])}
        zeroLine
        height={240}
      />
    </>
  );
}
