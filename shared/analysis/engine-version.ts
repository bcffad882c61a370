/** Version of the analysis engine, stored with every result so a recomputation can say what changed.
 * Bump it whenever a change can alter a number in a ShotAnalysis. */
export const ENGINE_VERSION = '1.0.0';
