/**
 * The margin engine: pure TypeScript (no I/O), shared by the server, the worker, the CLI and the
 * browser's what-if gain slider. Definitions and formats: shared MODEL-FORMAT.md.
 */
export * from './types';
export { ENGINE_VERSION } from './version';
export { MAX_MODEL_BYTES } from './limits';
export { loopModelSchema, MODEL_FORMAT, type LoopModel } from './schema';
export { parseModelText, type ParseOutcome } from './parse';
export { computeMargins, type MarginOptions } from './margins';
export { sampleResponse, type CaseResponse, type ResponsePoint } from './sampler';
export { summarizeModel, type ModelSummary } from './summary';
