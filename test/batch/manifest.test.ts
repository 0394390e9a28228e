import { describe, expect, it } from 'vitest';
import { parseManifest } from '../../core/batch/manifest.js';
import { XylemapError } from '../../core/util/errors.js';

const exists = (files: string[]) => (p: string) => files.some((f) => p.endsWith(f));
const check = { fileExists: exists(['/a.las', '/b.las', '/c.laz']), knownPresets: ['ring-porous', 'conifer'], maxPlausibleDbhM: 5 };

function messageOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(XylemapError);
    return (e as XylemapError).oneLine();
  }
  throw new Error('expected a XylemapError');
}

describe('parseManifest', () => {
  it('reads required and optional columns and resolves files against the manifest folder', () => {
    const rows = parseManifest(
      'tree_id,species,file,field_dbh_m,plot,preset,notes\noak-1,Quercus robur,a.las,0.42,P1,ring-porous,"open, park"\nspruce-1,Picea abies,/data/c.laz,,P2,,\n',
      '/campaign/manifest.csv',
      check,
    );
    expect(rows).toHaveLength(2);
    expect(rows[0]).toMatchObject({ index: 0, line: 2, treeId: 'oak-1', path: '/campaign/a.las', fieldDbhM: 0.42, preset: 'ring-porous', notes: 'open, park' });
    expect(rows[1].path).toBe('/data/c.laz');
    expect(rows[1].fieldDbhM).toBeNaN();
  });
  it('names every missing required column in one message', () => {
    const m = messageOf(() => parseManifest('id,file\nx,a.las\n', '/m.csv', check));
    expect(m).toContain('tree_id, species');
    expect(m).toContain('/m.csv');
  });
  it('lists every offending row in ONE error: missing file, duplicate id, unknown preset, DBH in cm, bad id', () => {
    const text = [
      'tree_id,species,file,field_dbh_m,preset',
      'oak-1,Q,a.las,0.4,',
      'oak-1,Q,b.las,0.5,',
      'oak-2,Q,missing.las,,',
      'oak-3,Q,a.las,42,',
      'oak-4,Q,b.las,,tropical',
      'bad/id,Q,a.las,,',
    ].join('\n');
    const m = messageOf(() => parseManifest(text, '/m.csv', check));
    expect(m).toContain('5 problems');
    expect(m).toContain('line 3: duplicate tree_id "oak-1" (first on line 2)');
    expect(m).toContain('line 4: file not found: missing.las');
    expect(m).toContain('line 5: field_dbh_m 42 m is implausible');
    expect(m).toContain('line 6: unknown preset "tropical"');
    expect(m).toContain('line 7: tree_id "bad/id"');
    expect(m.split('; ').length).toBe(5);
  });
  it('rejects a manifest without trees', () => {
    expect(() => parseManifest('tree_id,species,file\n', '/m.csv', check)).toThrow(/no trees/);
  });
});
