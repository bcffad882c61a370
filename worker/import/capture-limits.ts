import { ImportError } from '../../shared/import/import-error.ts';

/** The installation's limits on one capture file (server/config.ts), checked by the readers as early as they can. */
export interface CaptureLimits {
  /** Most channels a file may hold. @default no limit */
  maxChannels?: number;
  /** Most samples per channel. @default no limit */
  maxSamples?: number;
}

/** Refuses a layout with more channels than `maxChannels`, before any sample is read. */
export function checkChannelCount(channels: number, limits: CaptureLimits): void {
  if (limits.maxChannels === undefined || channels <= limits.maxChannels) return;
  throw new ImportError(
    `the file has ${channels.toLocaleString('en-US')} channels; this installation reads at most ${limits.maxChannels.toLocaleString('en-US')} per capture ` +
      '(setting GATEPOST_MAX_CHANNELS_PER_CAPTURE). Export only the channels of the gates, or split the file.',
  );
}

/** Refuses a record of more than `maxSamples` samples per channel (`atLeast`: the rows known to be there so far). */
export function checkSampleCount(atLeast: number, limits: CaptureLimits): void {
  if (limits.maxSamples === undefined || atLeast <= limits.maxSamples) return;
  throw new ImportError(
    `the file holds more than ${limits.maxSamples.toLocaleString('en-US')} samples per channel, the most this installation reads ` +
      '(setting GATEPOST_MAX_SAMPLES_PER_CHANNEL). Export a shorter record or a lower sample rate.',
  );
}
