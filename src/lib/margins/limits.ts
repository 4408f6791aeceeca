/**
 * Caps on what a model file may ask for. They bound the work a hostile or mistaken file can cause
 * (root finding is cubic in the order) while staying far above real loops.
 */
export const MAX_MODEL_BYTES = 5 * 1024 * 1024;
export const MAX_NESTING = 32;
export const MAX_POLY_DEGREE = 60;
export const MAX_STATES = 60;
export const MAX_ROOTS = 60;
export const MAX_MEASURED_POINTS = 100_000;
export const MAX_BLOCKS = 64;
export const MAX_CASES = 256;
/** Total order of one case's rational part, after discretisation and whole-sample delay. */
export const MAX_LOOP_ORDER = 120;
/** A sampled delay longer than this is refused (its phase would wind faster than any grid). */
export const MAX_DELAY_SAMPLES = 10_000;
/** Whole-sample delays up to this many samples are folded into the denominator as z^k. */
export const MAX_FOLDED_DELAY = 60;
/** Relative tolerance for "a whole number of samples". */
export const SAMPLE_TOLERANCE = 1e-9;
