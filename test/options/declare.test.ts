import { describe, expect, it } from 'vitest';
import { defineOptions, describeRule } from '../../core/options/declare.js';
import { XylemapError } from '../../core/util/errors.js';

const demo = defineOptions('demo', 'a stage for tests', {
  voxel_size_m: { type: 'number', default: 0.005, unit: 'm', min: 0.0005, max: 0.5, help: 'voxel edge length' },
  neighbours: { type: 'number', default: 16, unit: '1', min: 3, max: 128, integer: true, help: 'neighbours per point' },
  robust: { type: 'enum', values: ['tukey', 'huber'] as const, default: 'tukey', help: 'reweighting' },
  keep_ground: { type: 'boolean', default: false, help: 'keep ground points' },
});

describe('defineOptions', () => {
  it('fills every default when nothing is given', () => {
    expect(demo.resolve(undefined)).toEqual({ voxel_size_m: 0.005, neighbours: 16, robust: 'tukey', keep_ground: false });
  });

  it('keeps given values and fills the rest', () => {
    expect(demo.resolve({ neighbours: 8 })).toMatchObject({ neighbours: 8, voxel_size_m: 0.005 });
  });

  it('rejects an unknown key and names its path', () => {
    expect(() => demo.resolve({ voxel_size: 0.01 })).toThrowError(XylemapError);
    try {
      demo.resolve({ voxel_size: 0.01 });
    } catch (e) {
      expect((e as XylemapError).option).toBe('demo.voxel_size');
      expect((e as XylemapError).oneLine()).toContain('unknown option');
    }
  });

  it('rejects an out-of-range value with the rule and the value', () => {
    try {
      demo.resolve({ voxel_size_m: 2 });
      expect.unreachable();
    } catch (e) {
      const line = (e as XylemapError).oneLine();
      expect(line).toContain('demo.voxel_size_m');
      expect(line).toContain('[0.0005, 0.5] m');
      expect(line).toContain('got 2');
    }
  });

  it('rejects NaN, a non-integer count and an unknown enum value', () => {
    expect(() => demo.resolve({ voxel_size_m: Number.NaN })).toThrowError(/voxel_size_m|must be/);
    expect(() => demo.resolve({ neighbours: 4.5 })).toThrowError(XylemapError);
    expect(() => demo.resolve({ robust: 'cauchy' })).toThrowError(/one of tukey, huber/);
  });
});

describe('describeRule', () => {
  it('states bounds, integer-ness and unit', () => {
    expect(describeRule(demo.specs.neighbours)).toBe('an integer in [3, 128]');
    expect(describeRule({ type: 'number', default: 1, unit: 'MPa', max: 0, help: '' })).toBe('a number in (-∞, 0] MPa');
  });
});
