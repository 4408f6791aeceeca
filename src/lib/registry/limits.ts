/** Mirrors numeric(20, 9) of the threshold columns: what fits is stored exactly. */
export const THRESHOLD_SCALE = 9;
export const THRESHOLD_INTEGER_DIGITS = 20 - 9;
