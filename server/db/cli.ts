import { closeLabEventPublisher } from '../lib/lab-events.ts';
import type { Sequelize } from 'sequelize';
import { loadConfig, type Config } from '../config.ts';
import { createJobQueues } from '../lib/job-queues.ts';
import { createLogger } from '../lib/logger.ts';
import { createBlobStore } from '../storage/create-blob-store.ts';
import { createMigrator, migrateUp } from './migrator.ts';
import { attachDemoCaptures } from './seeders/demo-captures.ts';
import { recordDemoReviews } from './seeders/demo-reviews.ts';
import { seedDemo, seedDemoMoreShots, demoAccounts } from './seeders/demo.ts';
import { createSequelize } from './sequelize.ts';

/**
 * Database commands: `migrate` (apply pending migrations), `migrate:status`, `migrate:down` (undo the last one),
 * `seed-demo` (the demo labs, only when absent, with the demo's scope files queued), `demo-reviews` (the demo's review
 * scene, waiting for the worker to analyse the sweep; once). Usage: npm run db -- <command>
 * Several commands run one after another in one process (`migrate seed-demo`, as npm start does); the first that
 * fails stops the rest.
 */
async function main() {
  const commands = process.argv.slice(2);
  const config = loadConfig();
  const sequelize = createSequelize(config.databaseUrl);
  let command: string | undefined;
  try {
    if (commands.length === 0) commands.push('');
    for (command of commands) {
      if (process.exitCode) break;
      await run(command, config, sequelize);
    }
  } catch (err) {
    console.error(`Database command "${command}" failed: ${(err as Error).message}`);
    process.exitCode = 1;
  } finally {
    await sequelize.close();
    await closeLabEventPublisher();
  }
}

async function run(command: string, config: Config, sequelize: Sequelize): Promise<void> {
  switch (command) {
    case 'migrate': {
      const applied = await migrateUp(sequelize, config.databaseUrl);
      console.log(applied.length ? `Applied ${applied.length} migration(s): ${applied.join(', ')}` : 'Database schema is up to date.');
      break;
    }
    case 'migrate:status': {
      const migrator = createMigrator(sequelize);
      const [done, pending] = await Promise.all([migrator.executed(), migrator.pending()]);
      for (const m of done) console.log(`applied  ${m.name}`);
      for (const m of pending) console.log(`pending  ${m.name}`);
      break;
    }
    case 'migrate:down': {
      const undone = await createMigrator(sequelize).down();
      console.log(undone.length ? `Undid ${undone.map((m) => m.name).join(', ')}` : 'Nothing to undo.');
      break;
    }
    case 'seed-demo': {
      const seeded = await seedDemo(sequelize);
      console.log(seeded ? `Seeded the demo labs (${demoAccounts.length} accounts).` : 'Demo labs already present; left as they are.');
      if (seeded) {
        const more = await seedDemoMoreShots(sequelize);
        console.log(`Logged ${more} more demo shot(s) (the seal comparison and Sandgate's drop calibration).`);
        // The demo's scope files, read and analysed by the worker once it starts.
        const queues = createJobQueues(config.redisUrl);
        try {
          const n = await attachDemoCaptures({ blobStore: createBlobStore(config), queues, logger: createLogger(config.logLevel, 'seed') });
          console.log(`Queued ${n} demo scope file(s) for the worker to read and analyse.`);
        } finally {
          await queues.close();
        }
      }
      break;
    }
    case 'demo-reviews': {
      // The demo's review scene, once the worker has analysed the sweep (npm start runs this beside the worker).
      const outcome = await recordDemoReviews(sequelize, { waitMs: Number(process.env.GATEPOST_DEMO_REVIEWS_WAIT_MS ?? 300_000) });
      console.log({
        'recorded': 'Demo review scene recorded: shot 3 signed off, shot 5 returned with a comment, shot 7 waiting for review.',
        'already-recorded': 'Demo review scene already present; left as it is.',
        'not-seeded': 'No demo lab: no review scene to record.',
        'not-analysed': 'The demo sweep was not analysed in time: no review scene recorded (it is tried again on the next start).',
      }[outcome]);
      break;
    }
    default:
      console.error('Usage: npm run db -- migrate | migrate:status | migrate:down | seed-demo | demo-reviews');
      process.exitCode = 2;
  }
}

void main();
