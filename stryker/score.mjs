// The mutation score as Stryker defines it, shared by summarize.mjs and tally.mjs so the two count
// alike: (killed + timed out) / valid mutants, where compile errors, runtime errors and ignored
// mutants are not valid.
const NOT_VALID = new Set(['CompileError', 'RuntimeError', 'Ignored']);

/** True when the mutant counts in the score at all. */
export const isValid = (m) => !NOT_VALID.has(m.status);

/** True when the tests noticed the mutant (a timeout counts: the mutant made them hang). */
export const isDetected = (m) => m.status === 'Killed' || m.status === 'Timeout';

/** "d/v = p %". */
export const scoreText = (detected, valid) => `${detected}/${valid} = ${((100 * detected) / Math.max(1, valid)).toFixed(1)} %`;
