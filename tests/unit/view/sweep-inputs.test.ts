import { describe, expect, it } from 'vitest';
import type { DisplayUnits } from '../../../src/lib/sheet/display-units';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import { numberAt, siUnitAt, sweepInputs, sweepSettingsFrom } from '../../../src/lib/view/sweep-inputs';

describe('sweepInputs', () => {
  const doc = createSheetFromTemplate('duo-opposed', { kind: 'cylinder', radius: 0.02, halfLength: 0.03 });

  it('offers each roller radius, the object size, every joint angle, the damping and the twist', () => {
    const paths = sweepInputs(doc).map((i) => i.path);
    expect(paths).toContain('/hand/fingers/0/roller/radius');
    expect(paths).toContain('/hand/fingers/1/roller/radius');
    expect(paths).toContain('/object/shape/radius');
    expect(paths).toContain('/object/shape/halfLength');
    expect(paths).toContain('/hand/fingers/1/joints/2/angle');
    expect(paths).toContain('/solver/damping');
    expect(paths).toContain('/object/twist/angular/2');
    for (const input of sweepInputs(doc)) expect(input.value).toBe(numberAt(doc, input.path));
  });

  it('suggests a quarter either side of a size and a fixed span about a signed input', () => {
    const radius = sweepInputs(doc).find((i) => i.path === '/hand/fingers/0/roller/radius')!;
    expect(radius.unit.symbol).toBe('mm');
    expect(radius.from).toBeCloseTo(0.0105, 15);
    expect(radius.to).toBeCloseTo(0.0175, 15);
    const angle = sweepInputs(doc).find((i) => i.path === '/hand/fingers/0/joints/0/angle')!;
    expect(angle.unit.symbol).toBe('deg');
    expect(angle.from).toBeCloseTo(-Math.PI / 6, 15);
  });

  it("puts the sheet's own sweep first with its range", () => {
    const withSweep = { ...doc, sweep: { path: '/solver/damping', from: 1e-5, to: 1e-3, steps: 5 } };
    const [first, ...rest] = sweepInputs(withSweep);
    expect(first).toMatchObject({ path: '/solver/damping', from: 1e-5, to: 1e-3 });
    expect(first!.label).toMatch(/sheet's sweep: Solver damping/);
    expect(rest.some((i) => i.path === '/solver/damping')).toBe(false);
  });

  it('lists box half extents by axis', () => {
    const box = createSheetFromTemplate('tri-radial', { kind: 'box', halfExtents: [0.02, 0.025, 0.03], filletRadius: 0 });
    expect(sweepInputs(box).filter((i) => i.path.startsWith('/object/shape/')).map((i) => i.value)).toEqual([0.02, 0.025, 0.03]);
  });
});

describe('sweep inputs in the sheet\'s display units', () => {
  const doc = createSheetFromTemplate('duo-opposed', { kind: 'sphere', radius: 0.03 });
  const si: DisplayUnits = { length: 'm', angle: 'rad', angularSpeed: 'rpm' };
  const find = (path: string, units: DisplayUnits = si) => sweepInputs(doc, units).find((i) => i.path === path)!;

  it('shows lengths, angles and angular speeds in the chosen units (1 rpm = 2π/60 rad/s, 1 deg = π/180 rad; common practice)', () => {
    expect(find('/hand/fingers/0/roller/radius').unit).toEqual({ symbol: 'm', factor: 1 });
    expect(find('/hand/fingers/0/joints/0/angle').unit).toEqual({ symbol: 'rad', factor: 1 });
    expect(find('/object/twist/angular/2').unit.symbol).toBe('rpm');
    expect(find('/object/twist/angular/2').unit.factor).toBeCloseTo(60 / (2 * Math.PI), 12);
    expect(find('/object/twist/linear/0').unit).toEqual({ symbol: 'm/s', factor: 1 });
    const mm = find('/object/twist/linear/0', { length: 'mm', angle: 'deg', angularSpeed: 'rad/s' });
    expect(mm.unit.symbol).toBe('mm/s');
    expect(mm.unit.factor).toBeCloseTo(1000, 12);
    expect(find('/hand/fingers/0/joints/0/angle', { length: 'mm', angle: 'deg', angularSpeed: 'rad/s' }).unit.factor).toBeCloseTo(180 / Math.PI, 12);
  });

  it('turns a range typed in rpm into SI rad/s for the stored settings (60 rpm = 2π rad/s; common practice)', () => {
    const settings = sweepSettingsFrom(find('/object/twist/angular/2'), -60, 120, 5);
    expect(settings.from).toBeCloseTo(-2 * Math.PI, 12);
    expect(settings.to).toBeCloseTo(4 * Math.PI, 12);
  });

  it('keeps the range SI: the suggested range does not depend on the display units', () => {
    expect(find('/hand/fingers/0/roller/radius').from).toBe(find('/hand/fingers/0/roller/radius', { length: 'mm', angle: 'deg', angularSpeed: 'rad/s' }).from);
  });

  it('names the SI unit of a sheet sweep path beyond the offered inputs', () => {
    expect(siUnitAt('/motion/run/dt')).toBe('s');
    expect(siUnitAt('/hand/fingers/0/joints/1/axis/2')).toBe('1');
    expect(siUnitAt('/hand/fingers/0/joints/1/rateLimit')).toBe('rad/s');
    expect(siUnitAt('/hand/fingers/0/joints/1/limits/max')).toBe('rad');
    expect(siUnitAt('/hand/fingers/1/friction')).toBe('1');
    expect(siUnitAt('/object/pose/position/0')).toBe('m');
    const dt = sweepInputs({ ...doc, sweep: { path: '/motion/run/dt', from: 0.001, to: 0.01, steps: 3 } }, si)[0]!;
    expect(dt.unit).toEqual({ symbol: 's', factor: 1 });
  });
});

describe('sweepSettingsFrom and numberAt', () => {
  it('converts the typed range from the display unit to SI', () => {
    const input = sweepInputs(createSheetFromTemplate('duo-opposed', { kind: 'sphere', radius: 0.03 })).find((i) => i.path.endsWith('/joints/0/angle'))!;
    const settings = sweepSettingsFrom(input, -90, 180, 7);
    expect(settings.from).toBeCloseTo(-Math.PI / 2, 15);
    expect(settings.to).toBeCloseTo(Math.PI, 15);
    expect(settings).toMatchObject({ path: input.path, steps: 7 });
  });

  it('reads numbers by JSON pointer and NaN elsewhere', () => {
    const doc = createSheetFromTemplate('duo-opposed', { kind: 'sphere', radius: 0.03 });
    expect(numberAt(doc, '/object/shape/radius')).toBe(0.03);
    expect(numberAt(doc, '/object/shape')).toBeNaN();
    expect(numberAt(doc, '/nothing/here')).toBeNaN();
  });
});
