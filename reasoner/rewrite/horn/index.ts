// The Horn path of the rewriting: Horn-ALCHIQ normal form → plain Datalog over named individuals (README, "Horn path").

import type { NormalOntology } from '../../model/normal.js';
import type { RuleProgram } from '../../rules/types.js';
import { hornDatalog, type HornRewritingStats } from './datalog.js';
import { HornSaturationLimitError, type SaturationLimits } from './saturation.js';

export { hornDatalog, type HornRewritingStats } from './datalog.js';
export { HornSaturationLimitError, type SaturationLimits } from './saturation.js';

/**
 * Returns a rule program with no existential and no disjunctive rule whose least model has, over the named
 * individuals, the facts, sameAs and consistency that the normal form entails. Throws for a non-Horn normal form,
 * and HornSaturationLimitError when the saturation would exceed its limits (the chase path stays available).
 */
export function rewriteHornToDatalog(normal: NormalOntology, limits?: SaturationLimits): RuleProgram {
  return hornDatalog(normal, limits).program;
}

/**
 * The program reason() runs for a normal form: the Datalog rewriting when the normal form is Horn and the saturation
 * stays within its limits, else null (the caller keeps the one-rule-per-axiom program and the chase).
 */
export function hornProgramWithinLimits(normal: NormalOntology, limits?: SaturationLimits): { program: RuleProgram; stats: HornRewritingStats } | null {
  try {
    return hornDatalog(normal, limits);
  } catch (error) {
    if (error instanceof HornSaturationLimitError) return null;
    throw error;
  }
}
