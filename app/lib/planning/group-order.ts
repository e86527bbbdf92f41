// The order in which students in no group are put into new groups: by name (natural order), in
// roster order (the order they joined the course, i.e. the imported file's order), or shuffled
// with a seed that is shown, so the same seed forms the same groups again.
import { mersenne } from "pure-rand/generator/mersenne";
import { uniformInt } from "pure-rand/distribution/uniformInt";
import { naturalCompare } from "../natural-order";

export const GROUP_ORDERS = ["name", "roster", "shuffled"] as const;
export type GroupOrder = (typeof GROUP_ORDERS)[number];
export const GROUP_ORDER_TEXT: Record<GroupOrder, string> = {
  name: "By name",
  roster: "In roster order",
  shuffled: "Shuffled (with a seed you can repeat)",
};

export interface Placeable {
  name: string;
  /** position in the roster (course membership order) */
  rosterIndex: number;
}

/** A seed a person can read and type again: 1 to 999,999. */
export function newSeed(random: () => number = Math.random): number {
  return 1 + Math.floor(random() * 999_999);
}

/** The students in the chosen order; shuffled is a Fisher-Yates shuffle (Knuth, TAOCP vol. 2, Algorithm P; from memory) of the name order. */
export function orderForGroups<T extends Placeable>(students: readonly T[], order: GroupOrder, seed = 1): T[] {
  const byName = [...students].sort((a, b) => naturalCompare(a.name, b.name) || a.rosterIndex - b.rosterIndex);
  if (order === "name") return byName;
  if (order === "roster") return [...students].sort((a, b) => a.rosterIndex - b.rosterIndex);
  const rng = mersenne(seed);
  for (let i = byName.length - 1; i > 0; i--) {
    const j = uniformInt(rng, 0, i);
    [byName[i], byName[j]] = [byName[j], byName[i]];
  }
  return byName;
}
