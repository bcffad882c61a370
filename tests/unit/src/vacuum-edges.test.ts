// The trends page's tube-pressure bins: 1–2–5 edges around the measured pressures (preferred-number steps, common
// practice) and edges typed in kPa. Expected edges are worked out by hand for the demo sweep's pressures.
import { describe, expect, it } from 'vitest';
import { oneTwoFiveEdgesPa, parseEdgesKpa } from '../../../src/features/trends/lib/vacuum-edges.ts';

describe('oneTwoFiveEdgesPa', () => {
  it('When the sweep runs from 1.1 to 12 kPa, then the edges are 1, 2, 5, 10, 20 kPa: the lowest at or below 1.1, the last above 12', () => {
    expect(oneTwoFiveEdgesPa([12000, 8500, 6000, 4200, 3000, 2100, 1500, 1100, null])).toEqual([1000, 2000, 5000, 10000, 20000]);
  });
  it('When every shot has one pressure, then there is one bin around it; when none logged one, no edges', () => {
    expect(oneTwoFiveEdgesPa([300, 300])).toEqual([200, 500]);
    expect(oneTwoFiveEdgesPa([null])).toBeNull();
  });
});

describe('parseEdgesKpa', () => {
  it('When edges are typed in kPa, then they come back in Pa; a wrong one is named', () => {
    expect(parseEdgesKpa('1, 2, 5, 10')).toEqual({ edgesPa: [1000, 2000, 5000, 10000] });
    expect(parseEdgesKpa('0.5 1.5')).toEqual({ edgesPa: [500, 1500] });
    expect(parseEdgesKpa('2, 1').error).toBe('Edges must increase: 1 kPa comes after 2 kPa.');
    expect(parseEdgesKpa('1, lots').error).toBe('“lots” is not a positive number of kPa.');
    expect(parseEdgesKpa('3').error).toBe('Enter at least two edges in kPa, e.g. 1, 2, 5, 10.');
  });
});
