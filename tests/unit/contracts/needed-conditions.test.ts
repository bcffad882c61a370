// Which conditions a campaign's shots must log (issue 11 review, gap a): the rule behind the new-shot form's
// "This campaign needs", the campaign table's "conditions missing" and the API's neededConditions/missingConditions.
import { describe, expect, it } from 'vitest';
import { MACH_MATTERS_FROM_MS, missingConditions, neededConditions } from '../../../shared/contracts/shots.ts';

const labels = (facts: Parameters<typeof neededConditions>[0]) => neededConditions(facts).map((c) => c.label);

describe('neededConditions', () => {
  it('When a campaign has no launcher, logs no vacuum and is slow (a drop tower), then only the rig and the projectile are needed', () => {
    expect(labels({ launcher: false, vacuumLogged: false, fastestSpeedMs: 4.4 })).toEqual(['gate rig', 'projectile']);
    expect(labels({ launcher: false, vacuumLogged: false, fastestSpeedMs: null })).toEqual(['gate rig', 'projectile']);
  });
  it('When the campaign has a launcher tube (the model predicts from vacuum and outside air), then vacuum, ambient temperature and pressure are needed', () => {
    expect(labels({ launcher: true, vacuumLogged: false, fastestSpeedMs: null })).toEqual(['gate rig', 'projectile', 'tube vacuum', 'ambient temperature', 'ambient pressure']);
  });
  it('When a campaign without a logged tube records its vacuum and is fast (seals compared at a stated vacuum), then tube vacuum and ambient temperature are needed', () => {
    expect(labels({ launcher: false, vacuumLogged: true, fastestSpeedMs: 240 })).toEqual(['gate rig', 'projectile', 'tube vacuum', 'ambient temperature']);
  });
  it('When a shot reaches Mach 0.3 at 15 °C (c = 340.294 m/s, USSA 1976; the 0.3 limit is common practice), then the Mach number needs ambient temperature', () => {
    expect(MACH_MATTERS_FROM_MS).toBeCloseTo(102.088, 3);
    expect(labels({ launcher: false, vacuumLogged: false, fastestSpeedMs: 102.0 })).not.toContain('ambient temperature');
    expect(labels({ launcher: false, vacuumLogged: false, fastestSpeedMs: 102.1 })).toContain('ambient temperature');
  });
});

describe('missingConditions', () => {
  const shot = { projectileId: 'p', gateRigId: 'r', conditions: { tubePressurePa: null, ambientTemperatureK: 295.15, ambientPressurePa: null } };
  it('When a drop-tower shot logs no tube vacuum, then nothing is missing', () => {
    expect(missingConditions(shot, neededConditions({ launcher: false, vacuumLogged: false, fastestSpeedMs: 4.4 }))).toEqual([]);
  });
  it('When a launcher shot lacks its vacuum and outside pressure, then both are listed in form order', () => {
    expect(missingConditions(shot, neededConditions({ launcher: true, vacuumLogged: true, fastestSpeedMs: 230 }))).toEqual(['tube vacuum', 'ambient pressure']);
  });
});
