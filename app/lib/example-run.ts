// An invented example run for the "check a data set" page (demo data, not a measurement):
// A + B with B in excess, followed by conductivity, final reading not taken.
// The reference constants are the published ethyl acetate + hydroxide values listed in
// shared reference notes (k = 0.112 L/(mol s) at 25 C, Ea = 48.37 kJ/mol).
import { concentrationA, rateConstantAt } from "./kinetics";
import { normalSource } from "./kinetics/synthetic";
import type { FitFormValues } from "./fit-form";

export function inventedExample(): FitFormValues {
  const feed = { CA0: 0.02, CB0: 0.03, nu: 1 };
  const TK = 303.15;
  const k = rateConstantAt(0.112, 298.15, 48_370, TK) * 0.93; // the bench ran a little slow
  const S0 = 2.1;
  const Sinf = 1.3;
  const noise = normalSource(7);
  const rows = ["time_min,conductivity_mS_per_cm"];
  for (let minute = 0; minute <= 40; minute += 2) {
    const CA = concentrationA("second-order-AB", feed, k, minute * 60);
    const S = S0 + (Sinf - S0) * (1 - CA / feed.CA0) + 0.004 * noise();
    rows.push(`${minute},${S.toFixed(3)}`);
  }
  return {
    a: "1", b: "1", law: "AB", CA0: "20", CB0: "30", concentrationUnit: "mmol/L", timeUnit: "min",
    kind: "signal", S0: "2.100", Sinf: "", species: "A", epsilon: "", pathCm: "", baseline: "",
    temperatureC: "30", refK: "0.112", TrefC: "25", EaKJ: "48.37", tolerancePct: "25",
    data: rows.join("\n"),
  };
}
