// The Horn path of the rewriting: Horn-ALCHIQ normal form → plain Datalog over named individuals (README, "Horn path").

import type { NormalOntology } from '../../model/normal.js';
import type { RuleProgram } from '../../rules/types.js';
import { hornDatalog } from './datalog.js';
import type { SaturationLimits } from './saturation.js';

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
