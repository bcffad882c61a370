// Shots with a real, finished analysis for the review, export, report and notification tests, made in-process and
// fast: the shot model (shared/simulate) writes a capture whose truth we know, the stored channel files are
// written the way the worker writes them, and the analysis engine runs on it here. Only the job queue is skipped.
import { createHash } from 'node:crypto';
import { analyzeShot } from '../../shared/analysis/analyze-shot.ts';
import { ENGINE_VERSION } from '../../shared/analysis/engine-version.ts';
import { analysisOptionsSchema } from '../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { simulateShot } from '../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../shared/simulate/simulated-shot-to-capture.ts';
import { Analysis, Capture, GateRig, Projectile, Shot } from '../../server/db/models/index.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import type { ApiHarness } from '../helpers/api-harness.ts';

let serial = 0;

export interface AnalysedShotOptions {
  /** Speed the shot model is given at the first gate, m/s. @default 300 */
  speed?: number;
  /** Shot number in Hollowmere's first campaign. @default 500 + a counter */
  number?: number;
  /** Seal type logged on the shot. @default 'Polyester film, 50 µm' */
  sealType?: string;
  /** Tube pressure, Pa. @default 2000 */
  tubePressurePa?: number;
  /** Campaign. @default Hollowmere's first */
  campaignId?: string;
  /** Who logged the shot (and uploaded its capture). @default the demo experimenter */
  createdBy?: string | null;
  /** A time base misread by the importer: this sample interval (s) instead of the model's 200 ns, with seconds
   * "assumed", as a file whose time column has no unit would give. @default none (read right) */
  misreadInterval?: number;
  /** Fraction of the full step each gate's dip reaches (a weak gate below the threshold is missed). @default 1 each */
  dipDepth?: number[];
}

/** The three gate positions of the model, m (the demo rig's spacing is not needed: the analysis is told these). */
export const GATE_POSITIONS = [0, 0.15, 0.3];

/** A Hollowmere shot whose version 1 analysis is done, computed by the engine on a simulated capture. */
export async function analysedShot(h: ApiHarness, options: AnalysedShotOptions = {}) {
  const demo = h.demo;
  const labId = demo.labs.hollowmere.id;
  const [ball, rig] = await Promise.all([
    Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true }),
    GateRig.findOne({ where: { labId }, order: [['name', 'ASC']], rejectOnEmpty: true }),
  ]);
  const speed = options.speed ?? 300;
  const simulated = simulateShot({
    speed, diameter: 0.04, sampleInterval: 2e-7, length: 8000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.01, responseTime: 1e-6,
    seed: 5 + serial, gatePositions: GATE_POSITIONS, channelNames: ['Gate A', 'Gate B', 'Gate C'], dipDepth: options.dipDepth ?? 1,
  });
  const read = simulatedShotToCapture(simulated);
  const capture: ImportedCapture = options.misreadInterval === undefined ? read : {
    ...read,
    time: { kind: 'uniform', t0: 0, dt: options.misreadInterval, jitter: 0 },
    timeOrigin: { how: 'time-column', source: 'column 1 has no unit: seconds assumed', assumed: true },
    warnings: ['the time column has no unit; seconds were assumed'],
  };
  const shot = await Shot.create({
    labId, campaignId: options.campaignId ?? demo.hollowmere.campaignIds[0], number: options.number ?? 500 + serial++, firedAt: new Date('2026-10-14T09:30:00Z'),
    projectileId: ball.id, gateRigId: rig.id, tubePressurePa: options.tubePressurePa ?? 2000, sealType: options.sealType ?? 'Polyester film, 50 µm',
    ambientTemperatureK: 293.15, ambientPressurePa: 101_325, createdBy: options.createdBy === undefined ? demo.users.experimenter.id : options.createdBy,
  });
  const sha256 = createHash('sha256').update(`review-fixture-${shot.id}`).digest('hex');
  const row = await Capture.create({
    labId, shotId: shot.id, fileName: 'simulated.csv', sizeBytes: 1000, sha256, storageKey: `labs/${labId}/raw/${sha256}`,
    uploadedBy: shot.createdBy, state: 'ready',
  });
  const descriptor = await writeChannelFiles(h.deps.blobStore, labId, row.id, capture);
  await row.update({ channels: descriptor, sampleCount: capture.length, timeBase: descriptor.time, warnings: capture.warnings });
  const parameters = analysisOptionsSchema.parse({
    gates: GATE_POSITIONS.map((position, i) => ({ channel: capture.channels[i].name, position })),
    projectile: { length: 0.04, lengthTolerance: 0.0001, mass: 0.0027, massTolerance: 0.00005 },
    ambient: { temperature: 293.15 },
  });
  const results = JSON.parse(JSON.stringify(analyzeShot(capture, parameters))) as object;
  const analysis = await Analysis.create({
    labId, shotId: shot.id, version: 1, parameters, engineVersion: ENGINE_VERSION, jobKey: `fixture-${shot.id}-1`, requestedBy: null,
    state: 'done', results, captureIds: [row.id], completedAt: new Date(),
  });
  await shot.update({ status: 'analysed', currentAnalysisId: analysis.id });
  return { shotId: shot.id, shotNumber: shot.number, analysisId: analysis.id, captureId: row.id, speed, results: results as { speed: { value: number; uncertainty: number } } };
}
