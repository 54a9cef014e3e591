import type { Mesh } from '../../solver/mesh/Mesh.ts';
import type { ShapeDefinition } from './ShapeDefinition.ts';
import { buildToVertexCount } from './ShapeDefinition.ts';
import { ellipsePerimeter, ellipseRing, loftRings, ringCount, ROW_SPACING, type Ring } from './loftRings.ts';

/**
 * Limb-bud paddle: a bud growing out along +x from an open base (where it joins
 * the body flank, at x = 0). A round stalk of radius `baseRadius` widens smoothly
 * into a flattened paddle (half-width `paddleWidth` along y, half-thickness
 * `paddleThickness` along z) whose distal end is rounded (a half-disc in top view,
 * ending in a tip at x = length). Cross-sections are ellipses.
 */
export const limbBud: ShapeDefinition = {
  name: 'limb-bud',
  description: 'limb-bud paddle: open round base at x = 0, stalk widening into a flat rounded paddle along +x',
  closed: false,
  parameters: {
    length: { default: 3, min: 0, exclusiveMin: true, description: 'base-to-tip length along x' },
    baseRadius: { default: 0.5, min: 0, exclusiveMin: true, description: 'radius of the round stalk at the base' },
    paddleWidth: { default: 1, min: 0, exclusiveMin: true, description: 'half-width of the paddle (along y)' },
    paddleThickness: { default: 0.3, min: 0, exclusiveMin: true, description: 'half-thickness of the paddle (along z)' },
    stalk: { default: 0.25, min: 0, max: 1, description: 'fraction of the length that stays a round stalk before widening' },
  },
  check(p) {
    const x1 = p.stalk * p.length;
    const x2 = p.length - p.paddleWidth;
    if (x2 <= x1) {
      return `the paddle does not fit: length (${p.length}) must exceed stalk·length + paddleWidth = ${x1 + p.paddleWidth}; lengthen the bud or narrow the paddle`;
    }
    return null;
  },
  build(p, vertices) {
    const areaGuess = 2 * Math.PI * ((p.baseRadius + p.paddleWidth) / 2) * p.length * 1.2;
    return buildToVertexCount((h) => buildLimbBud(p, h), areaGuess, vertices);
  },
};

/** Cross-section semi-axes (along y, along z) at distance x from the base. */
export function limbBudSection(p: Record<string, number>, x: number): [number, number] {
  const x1 = p.stalk * p.length;
  const x2 = p.length - p.paddleWidth;
  const u = Math.min(1, Math.max(0, (x - x1) / (x2 - x1)));
  const s = u * u * (3 - 2 * u);
  let a = p.baseRadius + (p.paddleWidth - p.baseRadius) * s;
  let b = p.baseRadius + (p.paddleThickness - p.baseRadius) * s;
  if (x > x2) {
    const q = (x - x2) / (p.length - x2);
    const c = Math.sqrt(Math.max(0, 1 - q * q));
    a *= c;
    b *= c;
  }
  return [a, b];
}

function buildLimbBud(p: Record<string, number>, h: number): Mesh {
  // arc length of the top-view outline (x, a(x)), to place rings evenly
  const samples = 4000;
  const xs = new Float64Array(samples + 1);
  const arc = new Float64Array(samples + 1);
  for (let i = 0; i <= samples; i++) {
    const u = i / samples;
    xs[i] = p.length * u;
  }
  for (let i = 1; i <= samples; i++) {
    const [a0, b0] = limbBudSection(p, xs[i - 1]);
    const [a1, b1] = limbBudSection(p, xs[i]);
    arc[i] = arc[i - 1] + Math.hypot(xs[i] - xs[i - 1], Math.max(Math.abs(a1 - a0), Math.abs(b1 - b0)));
  }
  const total = arc[samples];
  const K = Math.max(2, Math.round(total / (h * ROW_SPACING)));
  const rings: Ring[] = [];
  let s = 0;
  for (let k = 0; k < K; k++) {
    const target = (k / K) * total;
    while (s < samples - 1 && arc[s + 1] < target) s++;
    const f = (target - arc[s]) / Math.max(1e-300, arc[s + 1] - arc[s]);
    const x = xs[s] + f * (xs[s + 1] - xs[s]);
    const [a, b] = limbBudSection(p, x);
    const n = ringCount(ellipsePerimeter(a, b), h, 3);
    const phase = (k % 2) * 0.5;
    rings.push({ points: ellipseRing([x, 0, 0], [0, 1, 0], [0, 0, 1], a, b, n, phase), phase });
  }
  return loftRings(rings, { endPole: [p.length, 0, 0] });
}
