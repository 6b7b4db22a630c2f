// Growth rules beyond cue sensing (fasciculation, target-sheet mapping, …) plug into the step
// loop through this one small interface, so the loop stays the only owner of time and each
// behaviour stays in its own module with its own equations.
//
// Adding a rule: write engine/agents/<rule>.ts exporting a factory `(world) => GrowthRule |
// undefined` (undefined when the scene does not use it) and add it to RULE_FACTORIES below.
import type { World } from './simulate.ts';
import type { ConePopulation } from '../agents/cones.ts';
import { pathfindingRule } from '../metrics/pathfinding.ts';
import { targetingRule } from '../agents/targeting/rule.ts';
import { fasciculationRule } from '../agents/fasciculation.ts';

export interface GrowthRule {
  readonly name: string;
  /** once per step, before any axon moves (e.g. rebuild a neighbour grid of terminals) */
  beforeStep?(step: number): void;
  /** Takes over axon i for this step (e.g. a terminal moving within its target sheet).
   *  Return true when handled: the loop then skips its own sensing and movement. */
  advance?(i: number, pop: ConePopulation, step: number): boolean;
  /** adds this rule's steering term into h[0..2] (before normalisation and noise) */
  steer?(i: number, pop: ConePopulation, x: number, y: number, z: number, h: Float64Array): void;
  /** axon i has moved from (x0, y0, z0) to its new position */
  moved?(i: number, pop: ConePopulation, x0: number, y0: number, z0: number): void;
  /** axon i has just reached its target; return true to keep it growing under this rule */
  reached?(i: number, pop: ConePopulation, step: number): boolean;
  /** once after the last step */
  finish?(stepsRun: number): void;
  /** run.json metrics under metrics[<key>] */
  metrics?(): Record<string, unknown>;
  /** extra axons.csv columns, one value per axon */
  axonColumns?(): { name: string; values: ArrayLike<number | string> }[];
}

export type RuleFactory = (world: World) => GrowthRule | undefined;

/** Rules in the order they act each step. */
export const RULE_FACTORIES: RuleFactory[] = [
  pathfindingRule, // first: it only watches, and must see every "reached" before a rule keeps the axon growing
  targetingRule,
  fasciculationRule,
];

export function buildRules(world: World): GrowthRule[] {
  const rules: GrowthRule[] = [];
  for (const make of RULE_FACTORIES) {
    const r = make(world);
    if (r) rules.push(r);
  }
  return rules;
}
