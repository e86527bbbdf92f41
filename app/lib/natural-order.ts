// Names people give groups and benches end in numbers: "Group 2" comes before "Group 10".
const collator = new Intl.Collator("en", { numeric: true, sensitivity: "base" });

/** Compares two names the way people read them (numbers by value, case ignored). */
export function naturalCompare(a: string, b: string): number {
  return collator.compare(a, b);
}

/** A copy of `items` sorted naturally by `name(item)`. */
export function naturalSort<T>(items: readonly T[], name: (item: T) => string): T[] {
  return [...items].sort((x, y) => naturalCompare(name(x), name(y)));
}

/** "Group 1" stays "Group 1" and "Red" becomes "group Red": never "Group Group 1". */
export function groupLabel(name: string): string {
  return /^group\b/i.test(name.trim()) ? name.trim() : `group ${name.trim()}`;
}

/** The first letter in capitals, for a label that starts a sentence. */
export function upperFirst(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}
