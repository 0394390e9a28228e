import { describe, expect, it } from 'vitest';
import { categoryColour, CATEGORICAL, layerColours, MISSING, RAMP, rampColour, rampPosition, valueRange } from '../../core/report/viewer/colour.js';
import { basisOf, eyeOf, frameBox, pan, rotate, zoom } from '../../core/report/viewer/orbit.js';
import { pickSegment } from '../../core/report/viewer/pick.js';

describe('rampColour', () => {
  it('returns the first and last stop at 0 and 1, clamps outside, and marks NaN as missing', () => {
    expect(rampColour(0)).toEqual(RAMP[0]);
    expect(rampColour(1)).toEqual(RAMP[RAMP.length - 1]);
    expect(rampColour(-3)).toEqual(RAMP[0]);
    expect(rampColour(7)).toEqual(RAMP[RAMP.length - 1]);
    expect(rampColour(NaN)).toEqual(MISSING);
  });

  it('interpolates linearly halfway between two stops', () => {
    const t = 0.5 / (RAMP.length - 1);
    expect(rampColour(t)).toEqual(RAMP[0].map((c, k) => Math.round((c + RAMP[1][k]) / 2)));
  });
});

describe('categoryColour', () => {
  it('cycles through the categorical set', () => {
    expect(categoryColour(0)).toEqual(CATEGORICAL[0]);
    expect(categoryColour(CATEGORICAL.length)).toEqual(CATEGORICAL[0]);
    expect(categoryColour(-1)).toEqual(MISSING);
  });

  it('switches to the ramp when there are more categories than colours', () => {
    const n = CATEGORICAL.length + 5;
    expect(categoryColour(0, n)).toEqual(RAMP[0]);
    expect(categoryColour(n - 1, n)).toEqual(RAMP[RAMP.length - 1]);
  });
});

describe('valueRange', () => {
  it('ignores non-finite values, and non-positive values on a log scale', () => {
    expect(valueRange([3, NaN, -2, Infinity, 5])).toEqual([-2, 5]);
    expect(valueRange([3, -2, 0, 5], true)).toEqual([3, 5]);
    expect(valueRange([NaN])).toBeNull();
  });
});

describe('rampPosition', () => {
  it('places the geometric mean in the middle of a log scale (log10)', () => {
    expect(rampPosition(0.1, [0.01, 1], { kind: 'continuous', log: true })).toBeCloseTo(0.5, 12);
    expect(rampPosition(2, [0, 8], { kind: 'continuous' })).toBeCloseTo(0.25, 12);
    expect(rampPosition(2, [0, 8], { kind: 'continuous', reverse: true })).toBeCloseTo(0.75, 12);
  });
});

describe('layerColours', () => {
  it('writes three 0–1 floats per segment and returns the value range', () => {
    const out = new Float32Array(9);
    expect(layerColours([1, 2, 3], { kind: 'continuous' }, out)).toEqual([1, 3]);
    expect(out[0]).toBeCloseTo(RAMP[0][0] / 255, 6);
    expect(out[6]).toBeCloseTo(RAMP[RAMP.length - 1][0] / 255, 6);
  });
});

describe('frameBox', () => {
  it('targets the box centre', () => {
    expect(frameBox([0, 0, 0], [2, 4, 10]).target).toEqual([1, 2, 5]);
  });
});

describe('eyeOf', () => {
  it('puts the eye at the orbit distance from the target', () => {
    const o = { target: [1, 2, 3] as [number, number, number], distance: 7, azimuth: 0.3, elevation: 0.4, fovDeg: 40 };
    const e = eyeOf(o);
    expect(Math.hypot(e[0] - 1, e[1] - 2, e[2] - 3)).toBeCloseTo(7, 12);
  });
});

describe('basisOf', () => {
  it('gives an orthonormal right-handed camera basis with up towards +z', () => {
    const { right, up, forward } = basisOf({ target: [0, 0, 0], distance: 5, azimuth: 1, elevation: 0.2, fovDeg: 40 });
    const dot = (a: number[], b: number[]) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
    for (const v of [right, up, forward]) expect(Math.hypot(...v)).toBeCloseTo(1, 12);
    expect(dot(right, up)).toBeCloseTo(0, 12);
    expect(dot(right, forward)).toBeCloseTo(0, 12);
    expect(dot(up, forward)).toBeCloseTo(0, 12);
    expect(up[2]).toBeGreaterThan(0);
  });
});

describe('rotate', () => {
  it('keeps the elevation below 85° however far the pointer moves', () => {
    const o = rotate({ target: [0, 0, 0], distance: 5, azimuth: 0, elevation: 0, fovDeg: 40 }, 0, 1e6);
    expect(o.elevation).toBeCloseTo((85 * Math.PI) / 180, 12);
  });
});

describe('pan', () => {
  it('moves the target within the view plane (perpendicular to the view direction)', () => {
    const o = { target: [0, 0, 0] as [number, number, number], distance: 5, azimuth: 0.7, elevation: 0.3, fovDeg: 40 };
    const p = pan(o, 30, -20, 600);
    const { forward } = basisOf(o);
    expect(p.target[0] * forward[0] + p.target[1] * forward[1] + p.target[2] * forward[2]).toBeCloseTo(0, 12);
    expect(Math.hypot(...p.target)).toBeGreaterThan(0);
  });
});

describe('zoom', () => {
  it('scales the distance and keeps it inside its bounds', () => {
    const o = { target: [0, 0, 0] as [number, number, number], distance: 5, azimuth: 0, elevation: 0, fovDeg: 40 };
    expect(zoom(o, 2).distance).toBe(10);
    expect(zoom(o, 1e-9).distance).toBe(1e-3);
  });
});

describe('pickSegment', () => {
  // Two vertical segments along the view centre line, one behind the other, and one far off to the side.
  const g = {
    count: 3,
    start: Float32Array.from([0, 0, -1, 0, -3, -1, 50, 0, -1]),
    end: Float32Array.from([0, 0, 1, 0, -3, 1, 50, 0, 1]),
    radius: Float32Array.from([0.05, 0.05, 0.05]),
  };
  // Eye on the +y side of the target, looking towards −y: segment 0 (y = 0) is nearer than segment 1 (y = −3).
  const o = { target: [0, 0, 0] as [number, number, number], distance: 10, azimuth: Math.PI / 2, elevation: 0, fovDeg: 40 };

  it('returns the nearest segment under the point', () => {
    expect(pickSegment(g, o, 800, 600, 400, 300)).toBe(0);
  });

  it('returns −1 where no segment is drawn', () => {
    expect(pickSegment(g, o, 800, 600, 20, 20)).toBe(-1);
  });

  it('picks the hidden segment once the view turns it aside, where the perspective projection puts it', () => {
    const side = { ...o, azimuth: 0 }; // eye at (10, 0, 0) looking to −x: screen right is +y
    // Pinhole projection: x_screen = w/2 + (y / depth) · focal, focal = (h/2) / tan(fov/2).
    const focal = 300 / Math.tan((20 * Math.PI) / 180);
    expect(pickSegment(g, side, 800, 600, 400 + (-3 / 10) * focal, 300)).toBe(1);
    expect(pickSegment(g, side, 800, 600, 400, 300)).toBe(0);
  });
});
