import type { Shot } from '../../db/models/index.ts';

/** The shot as the API shows it: SI values, named with their unit. */
export function shotSummary(s: Shot) {
  return {
    id: s.id,
    campaignId: s.campaignId,
    number: s.number,
    firedAt: s.firedAt,
    status: s.status,
    projectileId: s.projectileId,
    gateRigId: s.gateRigId,
    conditions: {
      tubePressurePa: s.tubePressurePa,
      sealType: s.sealType,
      ambientTemperatureK: s.ambientTemperatureK,
      ambientPressurePa: s.ambientPressurePa,
    },
    notes: s.notes,
    currentAnalysisId: s.currentAnalysisId,
  };
}
