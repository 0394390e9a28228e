import { describe, expect, it } from 'vitest';
import { correctionOptionsOf, fitOptions, reliabilityRuleOf } from '../../../core/reconstruct/fit/options.js';
import { DEFAULT_RELIABILITY_RULE } from '../../../core/reconstruct/fit/reliability.js';
import { XylemapError } from '../../../core/util/errors.js';

describe('fitOptions', () => {
  it('carries the same defaults as the reliability rule it configures', () => {
    // One declaration must not drift from the rule's documented defaults.
    const rule = reliabilityRuleOf(fitOptions.defaults());
    const { rangeNoiseM, pointSpacingM, ...rest } = rule;
    const { rangeNoiseM: _a, pointSpacingM: _b, ...def } = DEFAULT_RELIABILITY_RULE;
    expect(rest).toEqual(def);
    expect(rangeNoiseM).toBe(0.002);
    expect(pointSpacingM).toBe(0);
  });

  it('rejects an out-of-range value naming fit.<key>', () => {
    // Option rule of the project: errors name the stage and key.
    try {
      fitOptions.resolve({ min_arc_coverage: 1.5 });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(XylemapError);
      expect((e as XylemapError).option).toBe('fit.min_arc_coverage');
    }
    expect(() => fitOptions.resolve({ robust_loss: 'cauchy' })).toThrow(XylemapError);
  });
});

describe('reliabilityRuleOf', () => {
  it('passes the point spacing through', () => {
    expect(reliabilityRuleOf(fitOptions.defaults(), 0.004).pointSpacingM).toBe(0.004);
  });
});

describe('correctionOptionsOf', () => {
  it('maps the option keys to the correction settings', () => {
    const c = correctionOptionsOf(fitOptions.resolve({ radius_correction: 'none', edge_inflation_m: 0.001 }));
    expect(c.mode).toBe('none');
    expect(c.edgeInflationM).toBe(0.001);
    expect(c.rangeNoiseM).toBe(0.002);
  });
});
