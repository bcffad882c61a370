import { createHash } from 'node:crypto';
import { writeCaptureLayout, type LayoutName } from '../../../fixtures/lib/write-capture-layout.ts';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { simulateLauncherShot } from '../../../shared/physics/simulate-launcher-shot.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import type { JobQueues } from '../../lib/job-queues.ts';
import type { Logger } from '../../lib/logger.ts';
import type { BlobStore } from '../../storage/blob-store.ts';
import { Campaign, Capture, GateRig, Lab, Shot, User } from '../models/index.ts';
import { settleShot } from '../../modules/shots/settle-shot.ts';

/** The demo lab's sweep, as seeded in demo.ts. */
const DEMO = { lab: 'hollowmere', campaign: 'Vacuum sweep, autumn 2026', uploader: 'tomas.reyl@hollowmere.example' };

/**
 * Invented for the demo (not a measurement): the exit speed the launcher model with losses gives for the sweep's
 * launcher (2 m tube, 40.5 mm bore, the 40 mm 2.7 g ball) with an invented 2.2 N of friction and 1.8 mm² of leak,
 * at each shot's tube pressure and outside air, plus 0.2 m/s of shot-to-shot scatter. So the trends page's fit has
 * a launcher to find.
 */
function demoSpeed(shot: Shot): number {
  return simulateLauncherShot({
    tubeLength: 2, boreDiameter: 0.0405, projectileDiameter: 0.040, mass: 0.0027, frictionForce: 2.2, leakArea: 1.8e-6,
    tubePressure: shot.tubePressurePa ?? 0, ambientPressure: shot.ambientPressurePa ?? 101_325, ambientTemperature: shot.ambientTemperatureK ?? 293.15,
  }).exitSpeed + 0.2 * createRandom(300 + shot.number).normal();
}

/**
 * Air drag on a 40 mm, 2.7 g ball: a = ½·ρ·v²·C_d·A/m with ρ = 1.2 kg/m³ and C_d ≈ 0.5 for a sphere (values from
 * memory; demo only), about 12.6 km/s² at 300 m/s, so the three-gate fit has a deceleration to find.
 */
const dragDeceleration = (v: number) => (0.5 * 1.2 * v * v * 0.5 * Math.PI * 0.02 ** 2) / 0.0027;

/** Export layouts the importer reads on its own, so the demo shows files of more than one shape. */
const LAYOUTS: LayoutName[] = ['decimal-comma-latin1', 'plain-time', 'two-header-rows-tab'];

/**
 * Scope files for the demo sweep, made by the shot simulator: one CSV of the three gate channels per shot, stored
 * like an upload and queued for reading, so the worker reads and analyses them exactly as it would a lab's files
 * and the demo opens with traces, speeds and trends. Shot 5's gate C only half-darkens (the next shot's note says
 * its alignment was checked): it is reported missed with its dip, and the speed comes from gates A and B.
 * Only shots with no capture get one; returns how many files were queued.
 */
export async function attachDemoCaptures(deps: { blobStore: BlobStore; queues: JobQueues; logger: Logger }): Promise<number> {
  const lab = await Lab.findOne({ where: { slug: DEMO.lab } });
  const campaign = lab && (await Campaign.findOne({ where: { labId: lab.id, name: DEMO.campaign } }));
  const uploader = await User.findOne({ where: { email: DEMO.uploader } });
  if (!lab || !campaign || !uploader) return 0;
  const shots = await Shot.findAll({ where: { campaignId: campaign.id }, order: [['number', 'ASC']] });
  let queued = 0;
  for (const shot of shots) {
    if ((await Capture.count({ where: { shotId: shot.id } })) > 0 || !shot.gateRigId) continue;
    const rig = await GateRig.findByPk(shot.gateRigId, { rejectOnEmpty: true });
    const positions = rig.gates.map((g) => g.position_m);
    const speed = demoSpeed(shot);
    const sim = simulateShot({
      speed, deceleration: dragDeceleration(speed), gatePositions: positions,
      channelNames: rig.gates.map((g) => `Gate ${g.label}`), dipDepth: positions.map((_, i) => (shot.number === 5 && i === 2 ? 0.4 : 1)),
      // Room before gate A's pulse and after gate C's for the slowest shot (the ball's own 40 mm at its speed).
      sampleInterval: 2e-7, length: Math.max(10_000, Math.ceil((4e-4 + 0.4 / speed) / 2e-7)), t0: -1e-4 - 0.04 / speed, arrivalTime: 1e-4, noiseRms: 0.012, humAmplitude: 0.006,
      responseTime: 2e-6, beamOffset: 0.0015, seed: 100 + shot.number,
    });
    const { bytes } = writeCaptureLayout(LAYOUTS[shot.number % LAYOUTS.length], { t0: sim.time.t0, dt: sim.time.dt, channels: sim.channels });
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    const storageKey = `labs/${lab.id}/raw/${sha256}`;
    if (!(await deps.blobStore.exists(storageKey))) await deps.blobStore.putBytes(storageKey, bytes);
    const capture = await Capture.create({
      labId: lab.id, shotId: shot.id, fileName: `sweep-shot-${String(shot.number).padStart(2, '0')}.csv`, sizeBytes: bytes.length,
      sha256, storageKey, uploadedBy: uploader.id,
    });
    await settleShot(shot.id);
    // Redis away: the worker's sweep queues it once it runs.
    await deps.queues.addIngestOrDefer({ captureId: capture.id, attempt: capture.ingestAttempt }, deps.logger);
    queued++;
  }
  return queued;
}
