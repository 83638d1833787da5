/** A detector-card construct as used (every optional figure absent), for tests to override. */
import type { Card, ConstructCard } from "../../src/config/types.js";

export function testConstruct(overrides: Partial<ConstructCard> = {}): ConstructCard {
  return {
    key: "bored",
    label: "Boredom",
    kind: "affect",
    higherIs: "concern",
    auc: 0.71,
    aucPositives: 140,
    aucNegatives: 1100,
    kappa: undefined,
    threshold: 0.5,
    sensitivity: undefined,
    specificity: undefined,
    meanPInState: undefined,
    meanPNotInState: undefined,
    sdPInState: undefined,
    sdPNotInState: undefined,
    sustainedMinWindows: 3,
    calibration: { kind: "none" },
    ...overrides,
  };
}

export function testCard(constructs: readonly ConstructCard[] = [testConstruct()]): Card {
  return { windowSeconds: 20, validatedSettings: [], aucFloor: 0.6, constructs };
}
