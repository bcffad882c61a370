import { QueryTypes } from 'sequelize';
import { Capture } from '../../db/models/index.ts';
import type { Config } from '../../config.ts';
import { AppError } from '../../lib/errors.ts';
import { formatBytes } from '../../../shared/units/format-bytes.ts';

export interface LabStorageUse {
  /** Raw files kept for the lab, each stored once whatever the number of shots it is attached to. */
  rawBytes: number;
  /** Channel files (Float32 samples, min/max pyramids, explicit time columns) written from them. */
  channelBytes: number;
  usedBytes: number;
  /** null: no quota. */
  quotaBytes: number | null;
}

/**
 * What a lab's files take in the blob store. The channel files' sizes follow from each capture's descriptor
 * (server/traces/channel-files.ts: 4 bytes a sample, 8 a pyramid pair, 8 an explicit time), so nothing is listed.
 */
export async function labStorageUse(config: Config, labId: string): Promise<LabStorageUse> {
  const sequelize = Capture.sequelize!;
  const [row] = await sequelize.query<{ raw_bytes: string; channel_bytes: string }>(
    `SELECT
       (SELECT COALESCE(SUM(size_bytes), 0) FROM (SELECT DISTINCT ON (sha256) size_bytes FROM captures WHERE lab_id = :labId) raw) AS raw_bytes,
       (SELECT COALESCE(SUM(
          CASE WHEN c.channels->'time'->>'kind' = 'explicit' THEN (c.channels->>'length')::bigint * 8 ELSE 0 END
          + (SELECT COALESCE(SUM((ch->>'length')::bigint * 4
              + (SELECT COALESCE(SUM((lv->>'length')::bigint * 8), 0) FROM jsonb_array_elements(ch->'levels') lv)), 0)
             FROM jsonb_array_elements(c.channels->'channels') ch)), 0)
        FROM captures c WHERE c.lab_id = :labId AND jsonb_typeof(c.channels) = 'object') AS channel_bytes`,
    { replacements: { labId }, type: QueryTypes.SELECT },
  );
  const rawBytes = Number(row.raw_bytes);
  const channelBytes = Number(row.channel_bytes);
  return { rawBytes, channelBytes, usedBytes: rawBytes + channelBytes, quotaBytes: config.labStorageQuotaBytes || null };
}

/** Refuses (413) work that would take the lab past its storage quota, before anything is stored. */
export async function assertStorageRoom(config: Config, labId: string, incomingBytes: number, what: string): Promise<void> {
  if (!config.labStorageQuotaBytes) return;
  const use = await labStorageUse(config, labId);
  if (use.usedBytes + incomingBytes <= config.labStorageQuotaBytes) return;
  throw new AppError(
    413,
    'storage_quota',
    `${what} (${formatBytes(incomingBytes)}) would take the lab past its storage quota: ${formatBytes(use.usedBytes)} of ` +
      `${formatBytes(config.labStorageQuotaBytes)} used. Ask the installation's administrator for more room. Nothing was stored.`,
    { usedBytes: use.usedBytes, quotaBytes: config.labStorageQuotaBytes, incomingBytes },
  );
}

/**
 * What writeChannelFiles will store for a record of `length` samples in `channels` channels: Float32 samples, a
 * min/max pyramid of blocks of 16, 256, … samples (8 bytes a pair, about length/15 pairs in all), and Float64 times
 * when they are not evenly spaced. For the quota check before the files are written.
 */
export function estimateChannelFileBytes(length: number, channels: number, explicitTime: boolean): number {
  return Math.ceil(channels * length * (4 + 8 / 15) + (explicitTime ? length * 8 : 0));
}
