"""Baseline for `npm run bench:analyze -- --vs-numpy`: the speed between two light gates from a plain time-column
scope CSV, the way a lab script would do it with numpy alone (Debian's python3-numpy, run with /usr/bin/python3).

It does less than Gatepost's engine: the whole file with numpy.loadtxt, then for each channel one threshold halfway
between the idle level (the median: the beam is clear nearly all the record) and the lowest sample, the first falling
crossing interpolated linearly, and the speed as the
gate spacing over the time between the two crossings. No state-level histograms, no pulse pairing, no uncertainty.

usage: /usr/bin/python3 gate-speed.py FILE SPACING_M
"""
import sys

import numpy as np


def first_falling_crossing(t, v):
    level = 0.5 * (np.median(v) + v.min())
    above = v > level
    i = int(np.argmax(above[:-1] & ~above[1:]))  # first sample before the trace falls through the level
    if not (above[i] and not above[i + 1]):
        raise SystemExit("no falling crossing found")
    f = (v[i] - level) / (v[i] - v[i + 1])
    return t[i] + f * (t[i + 1] - t[i])


def main():
    path, spacing = sys.argv[1], float(sys.argv[2])
    data = np.loadtxt(path, delimiter=",", skiprows=1)
    t = data[:, 0]
    crossings = [first_falling_crossing(t, data[:, k]) for k in (1, 2)]
    print(f"speed: {spacing / (crossings[1] - crossings[0]):.2f} m/s")


main()
