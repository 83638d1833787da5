import type { GroupLevel } from "./types.js";

/**
 * Which groups are withheld, the same for every construct.
 *
 * Primary: fewer distinct students than the suppression size (settings; never below 5).
 * Complementary: a shown parent (a school, or the district) is a weighted total of its children; if
 * exactly one child is withheld, its figure could be worked out from the parent and its shown
 * siblings, so the smallest shown sibling is withheld as well (the classic rule of at least two
 * withheld cells per total; NCES 2011-603, Statistical Methods for Protecting Personally Identifiable
 * Information in Aggregate Reporting, technical brief 3). And a withheld parent whose children are
 * all shown could be rebuilt from them (and then a withheld sibling of the parent from the level
 * above), so its smallest child is withheld as well. Checked for schools within the district first,
 * then for classes within each school (a school's own status must be settled before its classes
 * are looked at, or a class may be withheld for a school that ends up withheld anyway).
 */
export interface Suppression {
  withheld(level: GroupLevel, id: string): boolean;
  /** Null when shown, else the sentence that says why. */
  reason(level: GroupLevel, id: string): string | null;
}

export interface GroupSize {
  readonly level: GroupLevel;
  readonly id: string;
  readonly parentId: string;
  /** Fewest distinct students over the constructs. */
  readonly students: number;
}

export function suppressionFor(groups: readonly GroupSize[], size: number): Suppression {
  const key = (level: GroupLevel, id: string) => `${level}\u0000${id}`;
  const why = new Map<string, string>();
  for (const g of groups) {
    if (g.students < size) {
      why.set(key(g.level, g.id), `Fewer than ${size} students: withheld to protect the students' privacy.`);
    }
  }
  const complementary =
    "Withheld so that a withheld neighbouring group cannot be worked out from the totals.";
  const children = (parentLevel: GroupLevel, childLevel: GroupLevel) => {
    const byParent = new Map<string, GroupSize[]>();
    for (const g of groups) {
      if (g.level !== childLevel) continue;
      const list = byParent.get(g.parentId);
      if (list) list.push(g);
      else byParent.set(g.parentId, [g]);
    }
    return { parentLevel, childLevel, byParent };
  };
  // Schools before classes: see the doc comment.
  const families = [children("district", "school"), children("school", "class")];
  let changed = true;
  while (changed) {
    changed = false;
    for (const f of families) {
      for (const [parentId, list] of f.byParent) {
        const hidden = list.filter((g) => why.has(key(g.level, g.id)));
        const parentHidden = why.has(key(f.parentLevel, parentId));
        if (hidden.length !== (parentHidden ? 0 : 1)) continue;
        const shown = list
          .filter((g) => !why.has(key(g.level, g.id)))
          .sort((a, b) => a.students - b.students || (a.id < b.id ? -1 : 1));
        const next = shown[0];
        if (next) {
          why.set(key(next.level, next.id), complementary);
          changed = true;
        }
      }
    }
  }
  return {
    withheld: (level, id) => why.has(key(level, id)),
    reason: (level, id) => why.get(key(level, id)) ?? null,
  };
}
