/** Version of the analysis engine, stored with every result so a recomputation can say what changed.
 * Bump it whenever a change can alter a number in a ShotAnalysis. */
// 1.1.0: the `edges` option (flight timed by mid-times, leading or trailing edges); default results unchanged.
// 1.2.0: polarity "auto" takes the state a record starts and ends in as beam-clear (a slow projectile's long pulse
//        was read inverted); records set up around a short pulse give the same results as 1.1.0.
// 1.3.0: results state their assumptions and carry the "check the time base" flag (implausible speed, pulse widths
//        against the logged length, sample interval, rebuilt or assumed time base); no number changes.
// 1.4.0: a missed gate's dip is the contiguous sub-threshold region around the deepest smoothed excursion, with its
//        start, end and depth (median of its core) instead of the deepest three-sample point; speeds unchanged.
export const ENGINE_VERSION = '1.4.0';
