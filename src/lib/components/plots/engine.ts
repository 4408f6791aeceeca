/**
 * The margin engine as the browser uses it. numeric's generated code looks up a global `numeric`
 * at call time, which the browser bundle does not define (see STACK.md); set it once here.
 */
import numeric from 'numeric';
import { parseModelText, sampleResponse, computeMargins } from '$lib/margins';

(globalThis as { numeric?: unknown }).numeric ??= numeric;

export { parseModelText, sampleResponse, computeMargins };
