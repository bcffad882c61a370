import { createHash } from 'node:crypto';
import { writeCaptureLayout, type LayoutName } from '../../../fixtures/lib/write-capture-layout.ts';
import { createRandom } from '../../../shared/analysis/create-random.ts';
import { simulateLauncherShot } from '../../../shared/physics/simulate-launcher-shot.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import type { JobQueues } from '../../lib/job-queues.ts';
import type { Logger } from '../../lib/logger.ts';
import type { BlobStore } from '../../storage/blob-store.ts';
import { Campaign, Capture, GateRig, Lab, Shot, User } from '../models/index.ts';
import { DEMO_DROP_HEIGHTS_M, DEMO_SEALS } from './demo.ts';
import { settleShot } from '../../modules/shots/settle-shot.ts';

/** The demo lab's sweep, as seeded in demo.ts. */
const DEMO = { lab: 'hollowmere', campaign: 'Vacuum sweep, autumn 2026', uploader: 'tomas.reyl@hollowmere.example' };
/** The demo's other shots (seedDemoMoreShots): Hollowmere's seal comparison and Sandgate's drop calibration. */
const SEALS = { lab: 'hollowmere', campaign: 'Seal comparison', uploader: 'tomas.reyl@hollowmere.example' };
const DROPS = { lab: 'sandgate', campaign: 'Drop calibration', uploader: 'sam.whitlow@sandgate.example' };

/** The sweep's launcher with the scenario's invented losses (2.2 N of friction, 1.8 mm² of leak). */
const LAUNCHER = { tubeLength: 2, boreDiameter: 0.0405, projectileDiameter: 0.040, mass: 0.0027, frictionForce: 2.2, leakArea: 1.8e-6 };

/**
 * Invented for the demo (not a measurement): the exit speed the launcher model with losses gives for the sweep's
 * launcher (2 m tube, 40.5 mm bore, the 40 mm 2.7 g ball) with an invented 2.2 N of friction and 1.8 mm² of leak,
 * at each shot's tube pressure and outside air, plus 0.2 m/s of shot-to-shot scatter. So the trends page's fit has
 * a launcher to find. A seal that holds until the air ahead reaches a higher pressure (the seal comparison's foil and
 * paper, DEMO_SEALS) slows the ball through the same model.
 */
function demoSpeed(shot: Shot, seed = 300): number {
  const seal = DEMO_SEALS.find((s) => s.sealType === shot.sealType)?.exitSealPressurePa ?? undefined;
  return simulateLauncherShot({
    ...LAUNCHER, ...(seal ? { exitSealPressure: seal } : {}),
    tubePressure: shot.tubePressurePa ?? 0, ambientPressure: shot.ambientPressurePa ?? 101_325, ambientTemperature: shot.ambientTemperatureK ?? 293.15,
  }).exitSpeed + 0.2 * createRandom(seed + shot.number).normal();
}

/**
 * Air drag on a 40 mm, 2.7 g ball: a = ½·ρ·v²·C_d·A/m with ρ = 1.2 kg/m³ and C_d ≈ 0.5 for a sphere (values from
 * memory; demo only), about 12.6 km/s² at 300 m/s, so the three-gate fit has a deceleration to find.
 */
const dragDeceleration = (v: number) => (0.5 * 1.2 * v * v * 0.5 * Math.PI * 0.02 ** 2) / 0.0027;

/** Standard acceleration of gravity, m/s² (3rd CGPM 1901; NIST SP 330). The drop tower's ball speeds up by it. */
const STANDARD_GRAVITY = 9.80665;

/** Export layouts the importer reads on its own, so the demo shows files of more than one shape. */
const LAYOUTS: LayoutName[] = ['decimal-comma-latin1', 'plain-time', 'two-header-rows-tab'];

/**
 * The sensors and scope of each demo lab. Rise times: a first-order response of time constant τ has a 10–90 % rise
 * time of 2.2·τ. Phototransistors answer in about 10 µs and photodiodes in about 1 µs, shorter with a smaller load
 * resistor (rule of thumb, DOMAIN.md "Sensor speed"; common practice): Hollowmere's phototransistors on 470 Ω loads
 * get τ = 2.1–2.7 µs (rise 4.6–5.9 µs), a little different per gate as real parts are; Sandgate's photodiodes on a
 * transimpedance amplifier get τ = 0.45 µs (rise 1 µs). Noise: Hollowmere's long unshielded leads pick up 12 mV rms
 * and 6 mV of mains hum, read by an 8-bit scope at 1 V/div (8 divisions / 256 levels = 31.25 mV steps); Sandgate's
 * amplified photodiodes show 4 mV rms and 2 mV of hum on a 12-bit scope (8 V / 4096 = 1.95 mV steps). All invented
 * for the demo, in the usual range of such set-ups (common practice).
 */
const SENSORS = {
  hollowmere: { responseTime: [2.4e-6, 2.1e-6, 2.7e-6], noiseRms: 0.012, humAmplitude: 0.006, adcStep: 8 / 256 },
  sandgate: { responseTime: [0.45e-6, 0.45e-6], noiseRms: 0.004, humAmplitude: 0.002, adcStep: 8 / 4096 },
};

/** The simulated record of one launcher shot (either Hollowmere campaign) through the three-gate exit rig. */
function launcherRecord(shot: Shot, rig: GateRig, inSweep: boolean) {
  const positions = rig.gates.map((g) => g.position_m);
  const speed = demoSpeed(shot, inSweep ? 300 : 700);
  return simulateShot({
    speed, deceleration: dragDeceleration(speed), gatePositions: positions,
    channelNames: rig.gates.map((g) => `Gate ${g.label}`), dipDepth: positions.map((_, i) => (inSweep && shot.number === 5 && i === 2 ? 0.4 : 1)),
    // Room before gate A's pulse and after gate C's for the slowest shot (the ball's own 40 mm at its speed).
    sampleInterval: 2e-7, length: Math.max(10_000, Math.ceil((4e-4 + 0.4 / speed) / 2e-7)), t0: -1e-4 - 0.04 / speed, arrivalTime: 1e-4,
    ...SENSORS.hollowmere, beamOffset: 0.0015, seed: (inSweep ? 100 : 600) + shot.number,
  });
}

/**
 * The simulated record of one drop: the ball falls from rest `h` above the upper gate, so it passes it at √(2·g·h)
 * and speeds up by g through the 0.5 m to the lower one (drag on a 67 g steel ball over a metre is far below the
 * timing's resolution and left out).
 */
function dropRecord(shot: Shot, rig: GateRig, heightM: number) {
  const positions = rig.gates.map((g) => g.position_m);
  const speed = Math.sqrt(2 * STANDARD_GRAVITY * heightM);
  const span = positions[positions.length - 1] - positions[0];
  const flight = (-speed + Math.sqrt(speed * speed + 2 * STANDARD_GRAVITY * span)) / STANDARD_GRAVITY;
  const dt = 2e-5;
  return simulateShot({
    speed, deceleration: -STANDARD_GRAVITY, gatePositions: positions, diameter: 0.0254, beamWidth: rig.beamWidthM ?? 0.002,
    channelNames: rig.gates.map((g) => g.label), polarity: 'falling',
    sampleInterval: dt, length: Math.ceil((flight + 0.06) / dt), t0: -0.03, arrivalTime: 0,
    ...SENSORS.sandgate, seed: 900 + shot.number,
  });
}

/**
 * Scope files for the demo's shots, made by the shot simulator: one CSV of the gate channels per shot, stored like
 * an upload and queued for reading, so the worker reads and analyses them exactly as it would a lab's files and the
 * demo opens with traces, speeds and trends. In the sweep, shot 5's gate C only half-darkens (the next shot's note
 * says its alignment was checked): it is reported missed with its dip, and the speed comes from gates A and B.
 * The seal comparison's and the drop calibration's shots (seedDemoMoreShots) get theirs the same way.
 * Only shots with no capture get one; returns how many files were queued.
 */
export async function attachDemoCaptures(deps: { blobStore: BlobStore; queues: JobQueues; logger: Logger }): Promise<number> {
  let queued = 0;
  for (const part of [DEMO, SEALS, DROPS]) {
    const lab = await Lab.findOne({ where: { slug: part.lab } });
    const campaign = lab && (await Campaign.findOne({ where: { labId: lab.id, name: part.campaign } }));
    const uploader = await User.findOne({ where: { email: part.uploader } });
    if (!lab || !campaign || !uploader) continue;
    const shots = await Shot.findAll({ where: { campaignId: campaign.id }, order: [['number', 'ASC']] });
    for (const shot of shots) {
      if ((await Capture.count({ where: { shotId: shot.id } })) > 0 || !shot.gateRigId) continue;
      const rig = await GateRig.findByPk(shot.gateRigId, { rejectOnEmpty: true });
      const sim = part === DROPS
        ? dropRecord(shot, rig, DEMO_DROP_HEIGHTS_M[shot.number - 1] ?? DEMO_DROP_HEIGHTS_M[0])
        : launcherRecord(shot, rig, part === DEMO);
      const { bytes } = writeCaptureLayout(LAYOUTS[shot.number % LAYOUTS.length], { t0: sim.time.t0, dt: sim.time.dt, channels: sim.channels });
      const sha256 = createHash('sha256').update(bytes).digest('hex');
      const storageKey = `labs/${lab.id}/raw/${sha256}`;
      if (!(await deps.blobStore.exists(storageKey))) await deps.blobStore.putBytes(storageKey, bytes);
      const prefix = part === DEMO ? 'sweep' : part === SEALS ? 'seals' : 'drop';
      const capture = await Capture.create({
        labId: lab.id, shotId: shot.id, fileName: `${prefix}-shot-${String(shot.number).padStart(2, '0')}.csv`, sizeBytes: bytes.length,
        sha256, storageKey, uploadedBy: uploader.id,
      });
      await settleShot(shot.id);
      // Redis away: the worker's sweep queues it once it runs.
      await deps.queues.addIngestOrDefer({ captureId: capture.id, attempt: capture.ingestAttempt }, deps.logger);
      queued++;
    }
  }
  return queued;
}
