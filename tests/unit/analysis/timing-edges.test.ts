import { describe, expect, it } from 'vitest';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';

// Known truth from the simulator: each gate's true mesial entry and exit instants. With a strong deceleration the
// leading edges, the trailing edges and the mid-times give measurably different mean speeds over the span, and
// each choice must match the speed computed from its own true instants (Δx / Δt, the definition of a mean speed).
describe('timing edges', () => {
  const sim = simulateShot({ speed: 250, deceleration: 40_000, gatePositions: [0, 0.2], sampleInterval: 1e-7, length: 20_000, noiseRms: 0.002, seed: 3 });
  const capture = simulatedShotToCapture(sim);
  const [a, b] = sim.truth.gates;
  const dx = b.position - a.position;
  const truth = {
    leading: dx / (b.entry - a.entry),
    trailing: dx / (b.exit - a.exit),
    both: dx / ((b.entry + b.exit) / 2 - (a.entry + a.exit) / 2),
  };

  it('When the trailing edges are slower than the leading ones (deceleration), then the truths differ by more than U', () => {
    const u = analyzeShot(capture, { gates: [{ channel: sim.channels[0].name, position: 0 }, { channel: sim.channels[1].name, position: 0.2 }] }).speed!.uncertainty;
    expect(truth.leading - truth.trailing).toBeGreaterThan(u);
  });

  for (const edges of ['both', 'leading', 'trailing'] as const) {
    it(`When edges = "${edges}", then the pair speed matches Δx/Δt of the true ${edges === 'both' ? 'mid-times' : `${edges} edges`} within U`, () => {
      const r = analyzeShot(capture, {
        edges,
        positionTolerance: 0,
        gates: [{ channel: sim.channels[0].name, position: 0 }, { channel: sim.channels[1].name, position: 0.2 }],
      });
      expect(r.speed!.basis).toBe('pair');
      expect(Math.abs(r.speed!.value - truth[edges])).toBeLessThan(r.speed!.uncertainty);
      expect(r.options.edges).toBe(edges);
    });
  }
});
