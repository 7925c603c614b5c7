// Test helper for the published rewriting: runs the chase on the program of rewrite/disjunctive (dynamic blocking
// off) for a tiny knowledge base, and reads off the facts over the original vocabulary.

import { rewriteToTerminatingRules } from '../../../reasoner/rewrite/disjunctive/index.js';
import type { ResourceLimits } from '../../../reasoner/api.js';
import type { TinyKb } from '../../reference/asp-reference.js';
import { normalOf, programFacts } from './kb-tools.js';

/** Facts as `C(a)`, `R(a,b)`, `a=b` (internal names left out), or null if inconsistent; also the run's statistics. */
export async function rewritingFacts(kb: TinyKb, limits?: ResourceLimits): Promise<{ facts: Set<string> | null; anonymous: number; copiedMerges: number }> {
  // The rewriting copies every input predicate into its internal vocabulary, so the facts' names belong to it too.
  return programFacts(rewriteToTerminatingRules(normalOf(kb, true)), kb, limits);
}
