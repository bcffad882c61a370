import { createHash } from 'node:crypto';
import { writeCaptureLayout, type LayoutName } from '../../../fixtures/lib/write-capture-layout.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import type { JobQueues } from '../../lib/job-queues.ts';
import type { Logger } from '../../lib/logger.ts';
import type { BlobStore } from '../../storage/blob-store.ts';
import { Campaign, Capture, GateRig, Lab, Shot, User } from '../models/index.ts';

/** The demo lab's sweep, as seeded in demo.ts. */
const DEMO = { lab: 'hollowmere', campaign: 'Vacuum sweep, autumn 2026', uploader: 'tomas.reyl@hollowmere.example' };

/**
 * Invented for the demo (not a measurement): exit speed falling with the air left in the tube, roughly as an open
 * evacuated-tube launcher behaves, 318 m/s at a hard vacuum and 9.2 m/s less per kPa.
 */
const demoSpeed = (tubePressurePa: number) => 318 - 9.2 * (tubePressurePa / 1000);

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
    const speed = demoSpeed(shot.tubePressurePa ?? 0);
    const sim = simulateShot({
      speed, deceleration: dragDeceleration(speed), gatePositions: positions,
      channelNames: rig.gates.map((g) => `Gate ${g.label}`), dipDepth: positions.map((_, i) => (shot.number === 5 && i === 2 ? 0.4 : 1)),
      sampleInterval: 2e-7, length: 10_000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.012, humAmplitude: 0.006,
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
    await shot.update({ status: 'processing' });
    // Redis away: the worker's sweep queues it once it runs.
    await deps.queues.addIngestOrDefer({ captureId: capture.id, attempt: capture.ingestAttempt }, deps.logger);
    queued++;
  }
  return queued;
}
