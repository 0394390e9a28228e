import { Command, CommanderError } from 'commander';
import { describe, expect, it } from 'vitest';
import { defineOptions, describeRule } from '../../core/options/declare.js';
import { XylemapError } from '../../core/util/errors.js';
import {
  addDeclaredFlags,
  addStageFlags,
  declaredFlag,
  givenFlags,
  parseDeclaredValue,
  stageFlagValues,
} from '../../cli/shared/declared-flags.js';

// A small declaration of every option type. The ranges are test values (common practice, no source).
const demo = defineOptions('demo', 'test stage', {
  size_m: { type: 'number', default: 0.015, unit: 'm', min: 0.002, max: 0.5, help: 'edge of a voxel' },
  count: { type: 'number', default: 8, unit: '1', min: 2, max: 64, integer: true, help: 'neighbours' },
  share: { type: 'number', default: 0.7, unit: '1', min: 0.5, max: 0.97, exclusive: true, help: 'leading share' },
  ground: { type: 'boolean', default: true, help: 'keep the ground' },
  leaves: { type: 'boolean', default: false, help: 'drop leaves' },
  shape: { type: 'enum', values: ['cone', 'ellipsoid'] as const, default: 'cone', help: 'crown shape' },
  label: { type: 'string', default: 'tree', help: 'a name' },
});
const other = defineOptions('other', 'second stage', {
  depth_m: { type: 'number', default: 1, unit: 'm', min: 0, help: 'depth' },
});

/** The XylemapError thrown by `fn` (the expect fails the test when nothing or something else is thrown). */
function errorOf(fn: () => unknown): XylemapError {
  let caught: unknown = null;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(XylemapError);
  return caught as XylemapError;
}

/** A command that throws instead of exiting, so parse errors can be inspected. */
function command(): Command {
  return new Command('demo').exitOverride().configureOutput({ writeErr: () => {}, writeOut: () => {} });
}

describe('parseDeclaredValue', () => {
  it('parses decimal and exponent notation as JavaScript Number() does', () => {
    // ECMA-262 StringToNumber: "1e-2" is 0.01, surrounding white space is allowed.
    expect(parseDeclaredValue('1e-2', demo.specs.size_m, 'demo', 'size_m')).toBe(0.01);
    expect(parseDeclaredValue(' 0.25 ', demo.specs.size_m, 'demo', 'size_m')).toBe(0.25);
  });

  it('refuses a number outside the declared range with the declaration rule in the message', () => {
    const e = errorOf(() => parseDeclaredValue('0.6', demo.specs.size_m, 'demo', 'size_m'));
    expect(e.message).toBe(`must be ${describeRule(demo.specs.size_m)}, got 0.6`);
    expect(e.option).toBe('demo.size_m');
    expect(e.hint).toBe('edge of a voxel');
  });

  it('refuses the bounds of an exclusive range and accepts a value just inside', () => {
    expect(() => parseDeclaredValue('0.5', demo.specs.share, 'demo', 'share')).toThrow(/must be a number in \(0\.5, 0\.97\)/);
    expect(() => parseDeclaredValue('0.97', demo.specs.share, 'demo', 'share')).toThrow(XylemapError);
    expect(parseDeclaredValue('0.51', demo.specs.share, 'demo', 'share')).toBe(0.51);
  });

  it('refuses a fraction where the declaration asks for an integer', () => {
    expect(() => parseDeclaredValue('2.5', demo.specs.count, 'demo', 'count')).toThrow(/must be an integer in \[2, 64\], got 2\.5/);
  });

  it('refuses NaN, Infinity, empty text and words, quoting the text as typed', () => {
    // ECMA-262: Number('') is 0 and Number('NaN') is NaN; neither may pass as a value.
    for (const raw of ['NaN', 'Infinity', '', '  ', 'abc']) {
      const e = errorOf(() => parseDeclaredValue(raw, demo.specs.size_m, 'demo', 'size_m'));
      expect(e.message).toBe(`must be a number in [0.002, 0.5] m, got "${raw}"`);
    }
  });

  it('reads true/false and 1/0 as booleans and refuses other words', () => {
    expect(parseDeclaredValue('true', demo.specs.ground, 'demo', 'ground')).toBe(true);
    expect(parseDeclaredValue('0', demo.specs.ground, 'demo', 'ground')).toBe(false);
    expect(() => parseDeclaredValue('yes', demo.specs.ground, 'demo', 'ground')).toThrow('must be true or false, got "yes"');
  });

  it('accepts only the declared enum values', () => {
    expect(parseDeclaredValue('ellipsoid', demo.specs.shape, 'demo', 'shape')).toBe('ellipsoid');
    expect(() => parseDeclaredValue('blob', demo.specs.shape, 'demo', 'shape')).toThrow('must be one of cone, ellipsoid, got "blob"');
  });

  it('gives the same message as resolve() for an out-of-range value', () => {
    const fromResolve = errorOf(() => demo.resolve({ count: 100 }));
    const fromFlag = errorOf(() => parseDeclaredValue('100', demo.specs.count, 'demo', 'count'));
    expect(fromFlag.oneLine()).toBe(fromResolve.oneLine());
  });
});

describe('declaredFlag', () => {
  it('spells the key in kebab case with a typed placeholder and the unit and default in the help', () => {
    const o = declaredFlag('demo', 'size_m', demo.specs.size_m);
    expect(o.flags).toBe('--size-m <number>');
    expect(o.description).toBe('edge of a voxel [m] (default 0.015)');
  });

  it('makes a true-by-default boolean a --no- switch in the switch style', () => {
    expect(declaredFlag('demo', 'ground', demo.specs.ground, { booleans: 'switch' }).flags).toBe('--no-ground');
    expect(declaredFlag('demo', 'leaves', demo.specs.leaves, { booleans: 'switch' }).flags).toBe('--leaves');
    expect(declaredFlag('demo', 'ground', demo.specs.ground).flags).toBe('--ground <true|false>');
  });

  it('lists the enum values as choices', () => {
    expect(declaredFlag('demo', 'shape', demo.specs.shape).argChoices).toEqual(['cone', 'ellipsoid']);
  });
});

describe('addDeclaredFlags', () => {
  it('adds one flag per declared option and maps keys to attribute names', () => {
    const cmd = command();
    const attributes = addDeclaredFlags(cmd, demo);
    expect(cmd.options.length).toBe(Object.keys(demo.specs).length);
    expect(attributes.get('size_m')).toBe('sizeM');
  });

  it('converts and checks values while commander parses', () => {
    const cmd = command();
    addDeclaredFlags(cmd, demo);
    cmd.parse(['--count', '12', '--ground', 'false'], { from: 'user' });
    expect(cmd.opts()).toMatchObject({ count: 12, ground: false });
    expect(() => command().addOption(declaredFlag('demo', 'count', demo.specs.count)).parse(['--count', '1'], { from: 'user' })).toThrow(
      'must be an integer in [2, 64], got 1',
    );
  });

  it('leaves a bad enum to commander in the switch style', () => {
    const cmd = command();
    addDeclaredFlags(cmd, demo, { booleans: 'switch' });
    expect(() => cmd.parse(['--shape', 'blob'], { from: 'user' })).toThrow(CommanderError);
  });
});

describe('givenFlags', () => {
  it('returns only the flags typed on the command line, not the implied defaults of --no- switches', () => {
    const cmd = command();
    const attributes = addDeclaredFlags(cmd, demo, { booleans: 'switch' });
    cmd.parse(['--size-m', '0.02'], { from: 'user' });
    // commander sets ground = true by default for --no-ground; that must not count as given.
    expect(cmd.opts().ground).toBe(true);
    expect(givenFlags(cmd, cmd.opts(), attributes)).toEqual({ size_m: 0.02 });
  });

  it('returns a switch the user typed', () => {
    const cmd = command();
    const attributes = addDeclaredFlags(cmd, demo, { booleans: 'switch' });
    cmd.parse(['--no-ground', '--leaves'], { from: 'user' });
    expect(givenFlags(cmd, cmd.opts(), attributes)).toEqual({ ground: false, leaves: true });
  });
});

describe('addStageFlags', () => {
  it('adds --stage.key flags for every stage with help, default and unit', () => {
    const cmd = command();
    addStageFlags(cmd, [demo, other]);
    const size = cmd.options.find((o) => o.long === '--demo.size_m');
    expect(size?.description).toBe('edge of a voxel (default 0.015 m)');
    expect(cmd.options.some((o) => o.long === '--other.depth_m')).toBe(true);
  });
});

describe('stageFlagValues', () => {
  it('returns only the given flags, converted, grouped by stage', () => {
    const cmd = command();
    addStageFlags(cmd, [demo, other]);
    cmd.parse(['--demo.count', '16', '--demo.leaves', '1'], { from: 'user' });
    expect(stageFlagValues(cmd.opts(), [demo, other])).toEqual({ demo: { count: 16, leaves: true }, other: {} });
  });

  it('refuses NaN and out-of-range values with the stage.key path and the rule', () => {
    const e = errorOf(() => stageFlagValues({ 'other.depth_m': 'NaN' }, [other]));
    expect(e.option).toBe('other.depth_m');
    expect(e.message).toBe('must be a number in [0, ∞) m, got "NaN"');
    expect(() => stageFlagValues({ 'other.depth_m': '-1' }, [other])).toThrow('must be a number in [0, ∞) m, got -1');
  });
});
