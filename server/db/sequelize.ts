import { Sequelize } from 'sequelize';
import type { Logger } from '../lib/logger.ts';
import { initModels } from './models/index.ts';

/** One connection pool per process. Models are registered here; the schema comes only from migrations. */
export function createSequelize(databaseUrl: string, logger?: Logger): Sequelize {
  const sequelize = new Sequelize(databaseUrl, {
    dialect: 'postgres',
    logging: logger ? (sql) => logger.trace({ sql }, 'sql') : false,
    pool: { max: 10, min: 0, idle: 10_000, acquire: 10_000 },
    define: { underscored: true },
    dialectOptions: { connectionTimeoutMillis: 5_000 },
  });
  initModels(sequelize);
  return sequelize;
}
