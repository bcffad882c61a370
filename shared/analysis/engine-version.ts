/** Version of the analysis engine, stored with every result so a recomputation can say what changed.
 * Bump it whenever a change can alter a number in a ShotAnalysis. */
// 1.1.0: the `edges` option (flight timed by mid-times, leading or trailing edges); default results unchanged.
export const ENGINE_VERSION = '1.1.0';
