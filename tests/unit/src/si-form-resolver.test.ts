// The form resolver behind the new-shot and library forms: lab units typed by a person become the SI body the API
// takes, validated by the API's own zod schemas, and every problem lands under the field the person typed into.
import { describe, expect, it } from 'vitest';
import type { ResolverOptions } from 'react-hook-form';
import { createShotBody } from '../../../shared/contracts/shots.ts';
import { gateRigBody } from '../../../shared/contracts/library.ts';
import { siFormResolver } from '../../../src/features/library/utils/si-form-resolver.ts';
import { celsiusToKelvin, toPascal, type PressureUnit } from '../../../src/features/campaigns/utils/lab-units.ts';

const options = { fields: {}, shouldUseNativeValidation: false } as ResolverOptions<any>;
const CAMPAIGN = '7b0c1d5e-3f47-4a8e-9c55-2d1e6f0a9b31';

interface ShotForm { pressure: string; unit: PressureUnit; tempC: string }
const shotResolver = siFormResolver<ShotForm, unknown>({
  schema: createShotBody,
  fieldOf: (path) => ({ tubePressurePa: 'pressure', ambientTemperatureK: 'tempC' } as Record<string, string>)[String(path[0])] ?? String(path[0]),
  toBody: (v, read) => ({
    campaignId: CAMPAIGN,
    tubePressurePa: read.number('pressure', v.pressure, (x) => toPascal(x, v.unit)),
    ambientTemperatureK: read.number('tempC', v.tempC, celsiusToKelvin),
  }),
});

describe('siFormResolver', () => {
  it('When a shot is typed in Torr and °C, then the body holds pascals and kelvin (760 Torr = 101 325 Pa, ISO 2533; 20 °C = 293.15 K)', async () => {
    const result = await shotResolver({ pressure: '760', unit: 'Torr', tempC: '20' }, undefined, options);
    expect(result.errors).toEqual({});
    const body = result.values as { tubePressurePa: number; ambientTemperatureK: number; campaignId: string };
    expect(body.campaignId).toBe(CAMPAIGN);
    expect(body.tubePressurePa).toBeCloseTo(101_325, 9);
    expect(body.ambientTemperatureK).toBeCloseTo(293.15, 12);
  });

  it("When the temperature is out of the server schema's range, then its own message shows under the °C field", async () => {
    const result = await shotResolver({ pressure: '1.5', unit: 'kPa', tempC: '-70' }, undefined, options);
    expect(result.values).toEqual({});
    expect(result.errors).toMatchObject({ tempC: { message: 'Ambient temperature looks wrong (below −60 °C).' } });
  });

  it('When a field is not a number, then it says so under that field (not as a schema type error)', async () => {
    const result = await shotResolver({ pressure: '1.5 kPa', unit: 'kPa', tempC: '' }, undefined, options);
    expect(result.errors).toMatchObject({ pressure: { message: 'Enter a number, e.g. 1.5 (a decimal comma is fine).' } });
    expect(Object.keys(result.errors)).toEqual(['pressure']);
  });

  it('When rig gates are out of order, then the issue lands on that gate row in the form (gates.1.positionMm)', async () => {
    interface RigForm { gates: { label: string; positionMm: string }[] }
    const rigResolver = siFormResolver<RigForm, unknown>({
      schema: gateRigBody,
      fieldOf: (path) => (path[0] === 'gates' && path[2] === 'position_m' ? `gates.${String(path[1])}.positionMm` : path.map(String).join('.')),
      toBody: (v, read) => ({
        name: 'Pair', beamWidthM: 0.001, sensorType: 'photodiode',
        gates: v.gates.map((g, i) => ({ label: g.label, position_m: read.number(`gates.${i}.positionMm`, g.positionMm, (mm) => mm / 1000), position_uncertainty_m: 0.0005 })),
      }),
    });
    const result = await rigResolver({ gates: [{ label: 'A', positionMm: '150' }, { label: 'B', positionMm: '100' }] }, undefined, options);
    const gates = (result.errors as { gates?: ({ positionMm?: { message: string } } | undefined)[] }).gates;
    expect(gates?.[1]?.positionMm?.message).toBe('Gate 2 (B) must lie further along the path than gate 1 (A): positions must strictly increase in flight order.');
    const ok = await rigResolver({ gates: [{ label: 'A', positionMm: '0' }, { label: 'B', positionMm: '150' }] }, undefined, options);
    expect((ok.values as { gates: { position_m: number }[] }).gates.map((g) => g.position_m)).toEqual([0, 0.15]);
  });
});
