/**
 * The real API server and worker for the HTTP benchmarks (bench/pipeline.ts, bench/api.ts), started the way the API
 * tests start them (tests/helpers/app-processes.ts) against the throwaway services of scripts/with-services.sh, on a
 * database seeded with the demo labs and a data folder of their own.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { GateRig, Lab, Projectile, Campaign } from '../../server/db/models/index.ts';
import { seedDemo } from '../../server/db/seeders/demo.ts';
import { createSequelize } from '../../server/db/sequelize.ts';
import { startAppProcesses, type AppProcesses } from '../../tests/helpers/app-processes.ts';

export interface BenchAppOptions {
  /**
   * Log level of both processes: "warn" keeps per-request log lines out of the measurement (they would be parsed
   * by this process, which shares the two cores with the server).
   * @default 'warn'
   */
  logLevel?: string;
  /** Extra environment for both processes. @default {} */
  env?: NodeJS.ProcessEnv;
  /** Run the compiled build (dist/node) as npm start does; false: the TypeScript through tsx. @default true */
  compiled?: boolean;
}

export interface BenchApp {
  app: AppProcesses;
  /** Hollowmere's id, its first campaign, the 40 mm ball and the three-gate exit rig. */
  labId: string;
  campaignId: string;
  ballId: string;
  rigId: string;
  close(): Promise<void>;
}

/** Seeds the demo labs (once per database) and starts the API server and the worker. */
export async function startBenchApp(options: BenchAppOptions = {}): Promise<BenchApp> {
  const { logLevel = 'warn', env = {}, compiled = true } = options;
  const databaseUrl = process.env.GATEPOST_TEST_DATABASE_URL;
  if (!databaseUrl) throw new Error('GATEPOST_TEST_DATABASE_URL is not set: run the benchmark through its npm script (scripts/with-services.sh)');
  const sequelize = createSequelize(databaseUrl);
  await seedDemo(sequelize);
  const lab = await Lab.findOne({ where: { slug: 'hollowmere' }, rejectOnEmpty: true });
  const campaign = await Campaign.findOne({ where: { labId: lab.id }, order: [['startedOn', 'ASC']], rejectOnEmpty: true });
  const ball = await Projectile.findOne({ where: { labId: lab.id, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  const rig = await GateRig.findOne({ where: { labId: lab.id, name: 'Exit rig, three gates' }, rejectOnEmpty: true });
  await sequelize.close();
  const dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-bench-'));
  const app = await startAppProcesses({ compiled, env: { GATEPOST_DATA_DIR: dataDir, GATEPOST_LOG_LEVEL: logLevel, ...env } });
  return {
    app,
    labId: lab.id,
    campaignId: campaign.id,
    ballId: ball.id,
    rigId: rig.id,
    async close() {
      await app.stop();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
