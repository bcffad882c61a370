import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface ProjectileRow {
  id: string; name: string; material: string; diameterM: number; diameterToleranceM: number; massKg: number; massToleranceKg: number; notes: string;
}
export interface GateRigRow {
  id: string; name: string; beamWidthM: number; sensorType: string; notes: string;
  gates: { label: string; position_m: number; position_uncertainty_m: number }[];
}

export const projectilesQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.projectiles(labId), queryFn: () => api.get<{ projectiles: ProjectileRow[] }>(`/api/labs/${labId}/projectiles`) });
export const gateRigsQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.gateRigs(labId), queryFn: () => api.get<{ gateRigs: GateRigRow[] }>(`/api/labs/${labId}/gate-rigs`) });

export const useProjectiles = (labId: string) => useQuery(projectilesQueryOptions(labId));
export const useGateRigs = (labId: string) => useQuery(gateRigsQueryOptions(labId));
