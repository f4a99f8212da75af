/**
 * Version of the continuation engine. Stored with every computed diagram; bump it whenever a change
 * can alter numbers in a diagram (methods, tolerances, defaults), so stored results can be recomputed.
 */
export const ENGINE_VERSION = '1.9.0';
