import { readFileSync } from "node:fs";
import { Ajv } from "ajv";
import { describe, expect, it } from "vitest";
import { AUC_FLOOR, CONSTRUCT_KEYS, CONSTRUCTS } from "../../src/demo/constructs.js";
import { DETECTOR_SLOPE } from "../../src/demo/detector.js";
import { demoCard } from "../../src/demo/simulate.js";
import { jStat } from "./reference.js";

const options = Object.freeze({ students: 120, seed: 20260202, mode: "planted" as const });

/**
 * Mean written probability of a window whose score is N(mu, 1), by a midpoint sum over ±10 sd of
 * jstat's normal density: the model's documented formula, p = logistic(logit(base) + 1.5(s − d/2)),
 * with d = √2·Φ⁻¹(AUC) from jstat (binormal AUC = Φ(d/√2); Hanley 1988, Swets 1986).
 */
function meanProbability(construct: (typeof CONSTRUCTS)[number], inState: boolean): number {
  const d = Math.SQRT2 * jStat.normal.inv(construct.auc, 0, 1);
  const logitBase = Math.log(construct.baseRate / (1 - construct.baseRate));
  const mu = inState ? d : 0;
  const h = 0.001;
  let sum = 0;
  for (let x = mu - 10 + h / 2; x < mu + 10; x += h) {
    sum += (jStat.normal.pdf(x, mu, 1) * h) / (1 + Math.exp(-(logitBase + DETECTOR_SLOPE * (x - d / 2))));
  }
  return sum;
}

describe("demo detector card", () => {
  const card = demoCard(options);

  it("passes the card schema and has exactly the contract's top-level keys", () => {
    const schema = JSON.parse(
      readFileSync(new URL("../../schemas/card.schema.json", import.meta.url), "utf8"),
    );
    const validate = new Ajv({ allErrors: true }).compile(schema);
    expect(validate(card), JSON.stringify(validate.errors)).toBe(true);
    // DATA-CONTRACT.md, "detector card": window_seconds, validated_settings, auc_floor, constructs.
    expect(Object.keys(card)).toEqual(["window_seconds", "validated_settings", "auc_floor", "constructs"]);
    expect(card.window_seconds).toBe(20);
    expect(card.auc_floor).toBe(0.6);
    expect(card.validated_settings).toEqual(["urban", "suburban"]);
  });

  it("lists the six constructs in order with their labels, kinds and directions", () => {
    expect(Object.keys(card.constructs)).toEqual([
      "bored",
      "confused",
      "frustrated",
      "concentrating",
      "off_task",
      "gaming",
    ]);
    const c = card.constructs;
    expect([c.bored.label, c.confused.label, c.frustrated.label]).toEqual([
      "Boredom",
      "Confusion",
      "Frustration",
    ]);
    expect([c.concentrating.label, c.off_task.label, c.gaming.label]).toEqual([
      "Engaged concentration",
      "Off task",
      "Gaming the system",
    ]);
    expect(CONSTRUCT_KEYS.map((k) => c[k].kind)).toEqual([
      "affect",
      "affect",
      "affect",
      "affect",
      "behaviour",
      "behaviour",
    ]);
    expect(CONSTRUCT_KEYS.filter((k) => c[k].higher_is === "good")).toEqual(["concentrating"]);
    expect(CONSTRUCT_KEYS.map((k) => c[k].sustained_min_windows)).toEqual([6, 6, 6, 6, 4, 4]);
    for (const k of CONSTRUCT_KEYS) {
      expect(c[k].calibration).toBe("none");
      expect(c[k].auc_positives).toBeGreaterThanOrEqual(150);
      expect(c[k].auc_positives).toBeLessThanOrEqual(300);
      expect(c[k].auc_negatives).toBeGreaterThanOrEqual(1000);
      expect(c[k].auc_negatives).toBeLessThanOrEqual(2000);
    }
  });

  it("reports validation AUCs near the chosen ones, frustration below the floor for every seed (±0.005)", () => {
    // The stratified validation sample keeps the empirical AUC within about ±0.001 of the binormal
    // AUC Φ(d/√2) = chosen AUC; 0.005 leaves room while still catching a wrong separation d.
    for (let seed = 1; seed <= 12; seed++) {
      const constructs = demoCard({ ...options, seed }).constructs;
      for (const model of CONSTRUCTS)
        expect(Math.abs(constructs[model.key].auc - model.auc)).toBeLessThan(0.005);
      expect(constructs.frustrated.auc).toBeLessThan(AUC_FLOOR);
    }
  });

  it("has sensitivity = specificity = Φ(d/2) at the threshold, the base rate (±0.015)", () => {
    // Equal-variance binormal model: the cut at d/2 gives both Φ(d/2) (jstat). Stratified sampling
    // puts the counts above a fixed cut within one of expectation; 4-decimal rounding moves a few more.
    for (const model of CONSTRUCTS) {
      const entry = card.constructs[model.key];
      const expected = jStat.normal.cdf(Math.SQRT2 * jStat.normal.inv(model.auc, 0, 1) * 0.5, 0, 1);
      expect(entry.threshold).toBe(model.baseRate);
      expect(Math.abs(entry.sensitivity - expected)).toBeLessThan(0.015);
      expect(Math.abs(entry.specificity - expected)).toBeLessThan(0.015);
    }
  });

  it("has mean probabilities in and out of state as the score model implies (±0.01)", () => {
    for (const model of CONSTRUCTS) {
      const entry = card.constructs[model.key];
      expect(Math.abs(entry.mean_p_in_state - meanProbability(model, true))).toBeLessThan(0.01);
      expect(Math.abs(entry.mean_p_not_in_state - meanProbability(model, false))).toBeLessThan(0.01);
    }
  });

  it("depends on the seed only", () => {
    expect(demoCard({ students: 5000, seed: options.seed, mode: "null" })).toEqual(card);
    expect(demoCard({ ...options, seed: options.seed + 1 })).not.toEqual(card);
  });
});
