// One number style on screen: true minus, ×10ⁿ powers, interval ends that differ.
// (The style is the design notes' rule; the digits are checked against hand-worked values.)
import { describe, expect, test } from "vitest";
import { distinctDigits, sig, styleNumbers, withInterval } from "~/lib/format";

describe("number style", () => {
  test("true minus sign and ×10⁻ⁿ, never e-5 or 10^-5", () => {
    expect(sig(-0.25)).toBe("−0.25");
    expect(sig(3.2e-5, 3)).toBe("3.2×10⁻⁵");
    expect(sig(-1.234e-4)).toBe("−1.234×10⁻⁴");
    expect(sig(2.5e6)).toBe("2.5×10⁶");
    expect(sig(0.00123)).toBe("0.00123");
    expect(sig(NaN)).toBe("—");
    for (const x of [1e-9, -7.7e-6, 4e7]) expect(sig(x)).not.toMatch(/e|\^|\*|-/);
  });

  test("an interval prints with enough digits for its ends to differ", () => {
    expect(withInterval(0.0020001, [0.0019996, 0.0020006])).toBe("0.0020001 (95 % CI 0.0019996 to 0.0020006)");
    expect(withInterval(0.002, [0.0019, 0.0021])).toBe("0.002000 (95 % CI 0.001900 to 0.002100)");
    expect(withInterval(0.1549, [0.1512, 0.1586])).toBe("0.1549 (95 % CI 0.1512 to 0.1586)");
    const text = withInterval(1.00000004e-4, [0.99999991e-4, 1.00000017e-4]);
    const [, lo, hi] = /CI (\S+) to (\S+)\)/.exec(text)!;
    expect(lo).not.toBe(hi);
    expect(distinctDigits([0.002, 0.002])).toBe(4);
    // three figures of 1012 are 1010 (never 1.01e+3)
    expect(withInterval(581, [150, 1012], 3)).toBe("581 (95 % CI 150 to 1010)");
  });

  test("engine text in the same style", () => {
    expect(styleNumbers("k = 1.2e-5 and intercept -0.03, 2*k")).toBe("k = 1.2×10⁻⁵ and intercept −0.03, 2·k");
    expect(styleNumbers("above absolute zero (-273.15 C)")).toBe("above absolute zero (−273.15 C)");
  });
});
