import { describe, expect, it } from 'vitest';
import { PALETTE, SCENE_COLOURS, SERIES_COLOURS, SEVERITY_COLOURS } from '../../../src/lib/view/palette';

/** sRGB component (0..1) to linear light: the sRGB transfer function of IEC 61966-2-1. */
const linear = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);

/** CIELAB (D65 white) of a #rrggbb colour: sRGB to XYZ with the IEC 61966-2-1 matrix, then CIE 15:2004's L*, a*, b*. */
function lab(hex: string): [number, number, number] {
  const [r, g, b] = [1, 3, 5].map((i) => linear(parseInt(hex.slice(i, i + 2), 16) / 255)) as [number, number, number];
  const x = (0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047;
  const y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  const z = (0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883;
  const f = (t: number) => (t > (6 / 29) ** 3 ? Math.cbrt(t) : t / (3 * (6 / 29) ** 2) + 4 / 29);
  return [116 * f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))];
}

/** Colour difference ΔE*ab (CIE 1976): the Euclidean distance in CIELAB. */
const deltaE = (a: string, b: string) => Math.hypot(...lab(a).map((v, i) => v - lab(b)[i]!));

/**
 * Least ΔE*ab between a plot line and a warning shade. A just noticeable difference is about 2.3
 * (value from memory); 30 keeps colours apart at a glance in a legend, not merely noticeably.
 */
const AT_A_GLANCE = 30;

describe('CIELAB conversion used by these checks', () => {
  it('puts pure sRGB red at L* 53.24, a* 80.09, b* 67.20 (widely tabulated value, from memory)', () => {
    expect(lab('#ff0000')).toBeNear([53.24, 80.09, 67.2], { abs: 0.05 });
  });

  it('puts white at L* 100 and a neutral grey on the a* = b* = 0 axis (CIE 15: D65 white is neutral; 0.1 allows for the four-digit IEC matrix)', () => {
    expect(lab('#ffffff')).toBeNear([100, 0, 0], { abs: 0.1 });
    const grey = lab('#777777');
    expect([grey[1], grey[2]]).toBeNear([0, 0], { abs: 0.1 });
  });
});

describe('SERIES_COLOURS', () => {
  it('never reuses a warning-severity colour', () => {
    for (const severity of Object.values(SEVERITY_COLOURS)) expect(SERIES_COLOURS).not.toContain(severity);
  });

  it.each(Object.entries(SEVERITY_COLOURS))('keeps every line at least ΔE*ab 30 from the %s shade', (_severity, shade) => {
    const nearest = Math.min(...SERIES_COLOURS.map((line) => deltaE(line, shade)));
    expect(nearest).toBeGreaterThanOrEqual(AT_A_GLANCE);
  });

  it('keeps the lines apart from each other and from the paper they are drawn on', () => {
    for (let i = 0; i < SERIES_COLOURS.length; i++) {
      expect(deltaE(SERIES_COLOURS[i]!, PALETTE.paper)).toBeGreaterThanOrEqual(AT_A_GLANCE);
      for (let j = i + 1; j < SERIES_COLOURS.length; j++) expect(deltaE(SERIES_COLOURS[i]!, SERIES_COLOURS[j]!)).toBeGreaterThanOrEqual(AT_A_GLANCE);
    }
  });
});

describe('SCENE_COLOURS arrows', () => {
  const arrows = { normal: SCENE_COLOURS.normal, velocity: SCENE_COLOURS.velocity, roll: SCENE_COLOURS.roll };

  it('never reuses a warning-severity colour', () => {
    for (const severity of Object.values(SEVERITY_COLOURS)) expect(Object.values(arrows)).not.toContain(severity);
  });

  it.each(Object.entries(SEVERITY_COLOURS))('keeps every arrow at least ΔE*ab 30 from the %s shade', (_severity, shade) => {
    for (const arrow of Object.values(arrows)) expect(deltaE(arrow, shade)).toBeGreaterThanOrEqual(AT_A_GLANCE);
  });

  it('keeps the arrows apart from each other, from the paper behind them, and from the roller and contact they start on', () => {
    const list = Object.values(arrows);
    for (let i = 0; i < list.length; i++) {
      for (const ground of [PALETTE.paper, SCENE_COLOURS.roller, SCENE_COLOURS.contact, SCENE_COLOURS.object]) expect(deltaE(list[i]!, ground)).toBeGreaterThanOrEqual(AT_A_GLANCE);
      for (let j = i + 1; j < list.length; j++) expect(deltaE(list[i]!, list[j]!)).toBeGreaterThanOrEqual(AT_A_GLANCE);
    }
  });
});
