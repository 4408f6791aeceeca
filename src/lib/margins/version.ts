/** Stored with every margin report: a change of numbers between versions is traceable. */
export const ENGINE_VERSION = '1.0.1';
