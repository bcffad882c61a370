import type { Deps } from '../../lib/deps.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { labStorageUse } from './service.ts';

export function storageRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/storage',
      access: { kind: 'lab', permission: 'members:manage' },
      summary: "What the lab's files take against its storage quota, and the limits on each file (lab admins)",
      async handler(req, res) {
        const { config } = deps;
        res.json({
          storage: await labStorageUse(config, req.lab!.id),
          limits: {
            fileBytes: config.uploadLimitBytes,
            requestBytes: config.uploadRequestLimitBytes,
            channelsPerCapture: config.maxChannelsPerCapture,
            samplesPerChannel: config.maxSamplesPerChannel,
          },
        });
      },
    },
  ];
}
