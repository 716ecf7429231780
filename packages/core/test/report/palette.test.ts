import { describe, expect, it } from 'vitest';
import { CLASS_COLOURS, HEAT_SCALE, LEFT_OUT_COLOUR } from '../../src/report/palette.js';

// sRGB to linear light, CIE XYZ (D65) and CIE L*a*b*: the standard formulas (common practice)
const linear = (c: number): number => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
const rgb = (hex: string): number[] => [1, 3, 5].map((i) => linear(parseInt(hex.slice(i, i + 2), 16) / 255));
function lab([r, g, b]: number[]): [number, number, number] {
  const x = (0.4124 * r! + 0.3576 * g! + 0.1805 * b!) / 0.9505;
  const y = 0.2126 * r! + 0.7152 * g! + 0.0722 * b!;
  const z = (0.0193 * r! + 0.1192 * g! + 0.9505 * b!) / 1.089;
  const f = (t: number): number => (t > 0.008856 ? Math.cbrt(t) : 7.787 * t + 16 / 116);
  return [116 * f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))];
}
// Simulation of full dichromacy on linear RGB, the widely used severity-1.0 matrices (values from memory)
const SIMULATIONS: Record<string, number[][]> = {
  protanopia: [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
  deuteranopia: [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.01182, 0.04294, 0.968881]],
  tritanopia: [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.3039]],
  'normal vision': [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
};
const simulate = (m: number[][], c: number[]): number[] => m.map((row) => Math.min(1, Math.max(0, row.reduce((s, v, j) => s + v * c[j]!, 0))));
const deltaE = (a: number[], b: number[]): number => Math.hypot(a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!);

describe('the report palette', () => {
  const colours = [...Object.values(CLASS_COLOURS), LEFT_OUT_COLOUR];

  it('keeps the class colours apart for the three kinds of dichromacy (CIE76 difference above 15)', () => {
    for (const [name, m] of Object.entries(SIMULATIONS)) {
      const seen = colours.map((c) => lab(simulate(m, rgb(c))));
      for (let i = 0; i < seen.length; i++) for (let j = i + 1; j < seen.length; j++) expect(deltaE(seen[i]!, seen[j]!), `${name}: ${colours[i]} vs ${colours[j]}`).toBeGreaterThan(15);
    }
  });

  it('orders the class colours by lightness, so that they stay apart in greyscale print (L* steps of at least 8)', () => {
    const l = colours.map((c) => lab(rgb(c))[0]).sort((a, b) => a - b);
    for (let i = 1; i < l.length; i++) expect(l[i]! - l[i - 1]!).toBeGreaterThanOrEqual(8);
  });

  it('the heat-map scale is one hue whose lightness falls step by step', () => {
    const l = HEAT_SCALE.map((c) => lab(rgb(c))[0]);
    for (let i = 1; i < l.length; i++) expect(l[i]!).toBeLessThan(l[i - 1]! - 8);
    // hue angle in a*b*: all within 30 degrees of each other
    const hues = HEAT_SCALE.map((c) => {
      const [, a, b] = lab(rgb(c));
      return ((Math.atan2(b, a) * 180) / Math.PI + 360) % 360;
    });
    expect(Math.max(...hues) - Math.min(...hues)).toBeLessThan(30);
  });
});
