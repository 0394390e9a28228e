import { describe, expect, it } from 'vitest';
import { canonicalJson, resumeDecision, runRecordKey } from '../../core/batch/resume.js';

describe('canonicalJson', () => {
  it('gives equal text for equal data in any key order', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { y: 2, x: 1 }], c: 2 } })).toBe(canonicalJson({ a: { c: 2, d: [1, { x: 1, y: 2 }] }, b: 1 }));
    expect(canonicalJson({ a: 1 })).not.toBe(canonicalJson({ a: 2 }));
  });
});

describe('runRecordKey', () => {
  it('finds the input hash and options in run.json', () => {
    expect(runRecordKey({ input: { sha256: 'ab' }, options: { x: 1 } })).toEqual({ inputSha256: 'ab', options: { x: 1 } });
    expect(runRecordKey(undefined)).toEqual({});
  });
});

describe('resumeDecision', () => {
  const required = ['summary.json', 'run.json'];
  const run = { input: { sha256: 'abc' }, options: { clean: { k: 1 } } };
  const expected = { inputSha256: 'abc', options: { clean: { k: 1 } } };
  it('skips a complete tree whose input hash and options are unchanged', () => {
    expect(resumeDecision(['run.json', 'summary.json', 'x'], required, run, expected)).toEqual({ skip: true });
  });
  it('reruns when an output is missing, the input changed or an option changed', () => {
    expect(resumeDecision(['run.json'], required, run, expected)).toEqual({ skip: false, reason: 'missing summary.json' });
    expect(resumeDecision(required, required, run, { ...expected, inputSha256: 'abd' })).toEqual({ skip: false, reason: 'input changed' });
    expect(resumeDecision(required, required, run, { ...expected, options: { clean: { k: 2 } } })).toEqual({ skip: false, reason: 'options changed' });
  });
  it('requires every file run.json lists as written', () => {
    const run = { input: { sha256: 'abc' }, options: {}, outputs: ['segments.csv', 'summary.json', 'run.json'] };
    const expected = { inputSha256: 'abc', options: {} };
    expect(resumeDecision(['summary.json', 'run.json'], ['summary.json', 'run.json'], run, expected)).toEqual({ skip: false, reason: 'missing segments.csv' });
    expect(resumeDecision(['segments.csv', 'summary.json', 'run.json'], ['summary.json', 'run.json'], run, expected)).toEqual({ skip: true });
  });
});
