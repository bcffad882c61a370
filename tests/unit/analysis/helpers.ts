import type { AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { simulateShot, type SimulateShotOptions } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';

/** Simulates a shot with known truth and analyses it. */
export function simulateAndAnalyze(sim: SimulateShotOptions, options: AnalysisOptionsInput = {}) {
  const shot = simulateShot(sim);
  const capture = simulatedShotToCapture(shot);
  const analysis = analyzeShot(capture, options);
  return { shot, capture, analysis };
}

/** True mean speed between two gates: distance over the time between the centre's passages. */
export function trueMeanSpeed(shot: ReturnType<typeof simulateShot>, i: number, j: number): number {
  const a = shot.truth.gates[i];
  const b = shot.truth.gates[j];
  return (b.position - a.position) / (b.centre - a.centre);
}
