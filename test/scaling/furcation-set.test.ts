import { describe, expect, it } from 'vitest';
import { annotateNetwork } from '../../core/topology/annotate.js';
import { collectFurcations, fitTaperRate } from '../../core/scaling/furcation-set.js';
import { combineRadius } from '../../core/scaling/estimate.js';
import { scalingOptions } from '../../core/scaling/options.js';
import { seg } from '../topology/fixtures.js';

/** Trunk internode of 4 segments (radii from the base up), then two child internodes of 4. */
function forked(trunk: number[], left: number[], right: number[]) {
  const segs = trunk.map((r, i) => seg(i, i - 1, [0, 0, i], [0, 0, i + 1], r));
  const add = (radii: number[], dx: number) => {
    let parent = trunk.length - 1;
    for (const r of radii) {
      const id = segs.length;
      segs.push(seg(id, parent, [0, 0, 0], [dx, 0, 1], r));
      parent = id;
    }
  };
  add(left, 1);
  add(right, -1);
  return segs;
}

const noTaper = scalingOptions.resolve({ taper_adjust: false });
const radiusOf = (samples: number[], network: ReturnType<typeof forked>) => combineRadius(samples, network.map((s) => s.radiusM));

// The window rule is the project's own documented rule (core/scaling/furcation-set.ts); the
// expected radii are worked out by hand.
describe('collectFurcations', () => {
  it('skips the joint-adjacent segment and takes the median of the next k = 2 on each side', () => {
    const segs = forked([0.5, 0.4, 0.3, 0.2], [0.15, 0.14, 0.13, 0.12], [0.1, 0.09, 0.08, 0.07]);
    const set = collectFurcations(annotateNetwork({ segments: segs }), noTaper);
    const f = set.furcations[0];
    expect(f.parentSamples).toEqual([2, 1]);
    expect(radiusOf(f.parentSamples, segs)).toBeCloseTo(0.35, 15);
    expect(radiusOf(f.childSamples[0], segs)).toBeCloseTo(0.135, 15);
    expect(radiusOf(f.childSamples[1], segs)).toBeCloseTo(0.085, 15);
    expect(f.radiusSource).toBe('window');
  });

  it('passes over unreliable segments inside the window', () => {
    const segs = forked([0.5, 0.4, 0.3, 0.2], [0.15, 0.14, 0.13, 0.12], [0.1, 0.09, 0.08, 0.07]);
    segs[2].reliable = false;
    const f = collectFurcations(annotateNetwork({ segments: segs }), noTaper).furcations[0];
    expect(f.parentSamples).toEqual([1, 0]);
  });

  it('falls back to the joint-adjacent segment when nothing else is reliable, and says so', () => {
    const segs = forked([0.5, 0.4, 0.3, 0.2], [0.15, 0.14, 0.13, 0.12], [0.1, 0.09, 0.08, 0.07]);
    for (const i of [0, 1, 2]) segs[i].reliable = false;
    const f = collectFurcations(annotateNetwork({ segments: segs }), noTaper).furcations[0];
    expect(f.parentSamples).toEqual([3]);
    expect(f.radiusSource).toBe('adjacent');
  });

  it('marks a furcation unusable when a side has no reliable segment at all', () => {
    const segs = forked([0.5, 0.4, 0.3, 0.2], [0.15, 0.14, 0.13, 0.12], [0.1, 0.09, 0.08, 0.07]);
    for (const i of [4, 5, 6, 7]) segs[i].reliable = false;
    expect(collectFurcations(annotateNetwork({ segments: segs }), noTaper).furcations[0].preExclusion).toBe('unreliable_segments');
  });

  it('measures window positions from the joint-adjacent segment by default, from the joint on request', () => {
    // Four 1 m segments: midpoints at 0.125, 0.375, 0.625, 0.875 of the internode from the joint.
    const segs = forked([0.5, 0.4, 0.3, 0.2], [0.15, 0.14, 0.13, 0.12], [0.1, 0.09, 0.08, 0.07]);
    const ann = annotateNetwork({ segments: segs });
    const adjacent = collectFurcations(ann, scalingOptions.resolve({})).furcations[0];
    const joint = collectFurcations(ann, scalingOptions.resolve({ taper_target: 'joint' })).furcations[0];
    expect(adjacent.parentU.map((u) => +u.toFixed(12))).toEqual([0.25, 0.5]);
    expect(joint.parentU.map((u) => +u.toFixed(12))).toEqual([0.375, 0.625]);
  });

  it('fits the within-internode taper without the joint-adjacent segments the windows skip', () => {
    // ln r = c + k·x with k = −0.2 on every internode (x = 0.125 … 0.875), but the segments next to
    // the joint read 30 % thick (points of the other branches); the fixed-effects fit on the
    // remaining segments must give k exactly (worked out by hand from the rule in furcation-set.ts).
    const x = [0.125, 0.375, 0.625, 0.875];
    const taper = (c: number) => x.map((v) => c * Math.exp(-0.2 * v));
    const trunk = taper(0.5);
    const left = taper(0.15);
    const right = taper(0.1);
    trunk[3] *= 1.3;
    left[0] *= 1.3;
    right[0] *= 1.3;
    const set = collectFurcations(annotateNetwork({ segments: forked(trunk, left, right) }), scalingOptions.resolve({}));
    expect(set.taper?.rate).toBeCloseTo(-0.2, 12);
  });
});

describe('fitTaperRate', () => {
  it('recovers a common within-internode log-radius slope despite different internode intercepts', () => {
    // ln r = c_g + k·x with k = −0.2 in two internodes of different size (fixed-effects least squares).
    const x = Float64Array.from([0.125, 0.375, 0.625, 0.875]);
    const radii = [...Array.from(x, (v) => 0.3 * Math.exp(-0.2 * v)), ...Array.from(x, (v) => 0.05 * Math.exp(-0.2 * v))];
    const k = fitTaperRate([{ samples: Int32Array.from([0, 1, 2, 3]), x }, { samples: Int32Array.from([4, 5, 6, 7]), x }], radii);
    expect(k).toBeCloseTo(-0.2, 12);
  });
});
