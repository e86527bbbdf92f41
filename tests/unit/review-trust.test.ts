// Pure parts of the review work: file rows on flags, the queue's neighbours and words, the one
// feed ratio, marks out of 100.
import { describe, expect, test } from "vitest";
import { withFileRows, fileRowsText } from "~/lib/marking/rows";
import { flaggedWords, neighbours } from "~/lib/marking/queue";
import { feedRatio, nuOf, FEED_RATIO_HEADER } from "~/lib/planning/feed-ratio";
import { marksOutOf, partText } from "~/lib/marking/rubric-view";
import { DEFAULT_RUBRIC } from "~/lib/marking/rubric";

describe("file rows", () => {
  test("an engine index becomes the file row, once", () => {
    const flags = [{ code: "outlier", message: "Row 6 lies far from the rest (studentised residual 5.1)", rows: [6] }];
    const rowNumbers = [2, 3, 4, 5, 6, 7, 8, 10];
    const once = withFileRows(flags, rowNumbers);
    expect(once[0].fileRows).toEqual([8]);
    expect(once[0].message).toBe("Row 8 of the file lies far from the rest (studentised residual 5.1)");
    expect(withFileRows(once, rowNumbers)[0].message).toBe(once[0].message);
    expect(fileRowsText([3, 4])).toBe("rows 3, 4");
  });
});

describe("queue", () => {
  const stops = [
    { id: 1, group: "G1", flagged: false },
    { id: 2, group: "G2", flagged: true },
    { id: 3, group: "G3", flagged: false },
    { id: 4, group: "G4", flagged: true },
  ];
  test("next flagged goes forward and wraps", () => {
    expect(neighbours(stops, 2).nextFlagged?.id).toBe(4);
    expect(neighbours(stops, 4).nextFlagged?.id).toBe(2);
    expect(neighbours(stops, 3)).toMatchObject({ previous: { id: 2 }, next: { id: 4 }, position: 3, of: 4 });
    expect(neighbours([stops[0]], 1).nextFlagged).toBeNull();
  });
  test("words, most telling first", () => {
    expect(flaggedWords("marked", ["low-conversion", "unit-slip"])).toEqual(["units", "short run"]);
    expect(flaggedWords("failed", [])).toEqual(["failed"]);
  });
});

describe("feed ratio", () => {
  test("M = CB0/(ν·CA0): the stoichiometric bench is 1 for 1:1 and 1:2", () => {
    // textbook definition of the stoichiometric feed (common practice, no source)
    expect(feedRatio(0.02, 0.02, nuOf({ coeffA: 1, coeffB: 1 }))).toBe(1);
    expect(feedRatio(0.02, 0.04, nuOf({ coeffA: 1, coeffB: 2 }))).toBe(1);
    expect(FEED_RATIO_HEADER).toBe("M = CB0/(ν·CA0)");
  });
});

describe("marks out of 100", () => {
  test("weights normalised; parts as x of y marks", () => {
    expect(marksOutOf(DEFAULT_RUBRIC)).toEqual({ experiment: 60, analysis: 40 });
    expect(partText(30, 30)).toBe("30 of 30 marks");
  });
});
