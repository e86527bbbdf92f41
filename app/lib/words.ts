// Labels must not say a word twice in a row ("Group Group 1") or repeat a unit ("t (s) (s)").
// Pure, so the browser tests check headings and column names with the same rule.

/** The doubled words or units in `text` (case-insensitive), e.g. ["group", "(s)"]; [] when none. */
export function doubledWords(text: string): string[] {
  const tokens = text.toLowerCase().split(/\s+/).filter(Boolean);
  const found: string[] = [];
  for (let i = 1; i < tokens.length; i++) {
    // a number repeated ("1 1") or a bare sign is data, not a doubled word
    if (tokens[i] === tokens[i - 1] && /[a-z(]/.test(tokens[i]) && !/^[–—·/×=+-]$/.test(tokens[i])) found.push(tokens[i]);
  }
  return found;
}
