import { describe, expect, it } from 'vitest';
import { analyseMeasuredFurcations, analyseScaling, parseEdges, radiusClass } from '../../core/scaling/analyse.js';
import { parseMeasuredFurcations } from '../../core/scaling/measured.js';
import { exactExponentNetwork } from '../../core/scaling/synthetic.js';
import type { Network } from '../../core/types/network.js';

const fast = { bootstrap_replicates: 200, permutations: 99, min_radius_m: 0.001 };

describe('analyseScaling', () => {
  it('recovers exact exponents to 1e-9 (median and pooled), with and without taper along internodes', () => {
    for (const exponent of [1.8, 2, 2.5, 3]) {
      for (const taperPerInternode of [0, 0.05]) {
        const net = exactExponentNetwork({ exponent, depth: 4, leaderShare: 0.65, taperPerInternode });
        const { summary } = analyseScaling(net, fast);
        expect(Math.abs(summary.exponent.estimate! - exponent)).toBeLessThan(1e-9);
        expect(Math.abs(summary.pooled.estimate! - exponent)).toBeLessThan(1e-9);
        expect(summary.exponent.n_used).toBe(15);
      }
    }
  });

  it('places the estimate in the theory table: da Vinci inside, Murray outside for an exact a = 2 tree', () => {
    // Check values: da Vinci 2 (Eloy 2011, PRL 107:258101), Murray 3 (Murray 1926, PNAS 12:207),
    // 11/4 and 7/4 (Kleiber-type variants, from memory), (m + n)/2 with m = 4, n = 1.5 → 2.75.
    const { summary } = analyseScaling(exactExponentNetwork({ exponent: 2, depth: 4 }), { ...fast, metabolic_exponent_n: 1.5 });
    const row = (name: string) => summary.theory.find((t) => t.name === name)!;
    expect(row('da_vinci').value).toBe(2);
    expect(row('murray').value).toBe(3);
    expect(row('murray_kleiber').value).toBe(2.75);
    expect(row('da_vinci_kleiber').value).toBe(1.75);
    expect(row('general_optimum').value).toBe(2.75);
    expect(row('da_vinci').inside_ci95).toBe(true);
    expect(row('murray').inside_ci95).toBe(false);
  });

  it('gives the WBE closed forms on symmetric networks: β = n^(-1/2), γ = n^(-1/3) → θ = 3/4', () => {
    // West, Brown & Enquist 1997, Science 276:122: area-preserving, space-filling branching gives θ = 3/4.
    for (const n of [2, 3]) {
      const net = exactExponentNetwork({ exponent: 2, depth: 3, childrenPerFurcation: n, lengthRatio: n ** (-1 / 3) });
      const w = analyseScaling(net, fast).summary.wbe.pooled;
      expect(w.branching_ratio_n).toBe(n);
      expect(w.radius_ratio_beta!).toBeCloseTo(n ** -0.5, 12);
      expect(w.length_ratio_gamma!).toBeCloseTo(n ** (-1 / 3), 12);
      expect(w.exponent_from_beta!).toBeCloseTo(2, 12);
      expect(w.length_exponent_from_gamma!).toBeCloseTo(3, 12);
      expect(w.theta!).toBeCloseTo(0.75, 12);
    }
  });

  it('finds the pipe-model slope 1 for area against tips on a symmetric a = 2 tree', () => {
    // Shinozaki et al. 1964 (Jpn. J. Ecol. 14:97): area ∝ tips supplied; with a = 2 and equal
    // children each child carries exactly half the area and half the tips.
    const t = analyseScaling(exactExponentNetwork({ exponent: 2, depth: 5 }), fast).summary.taper!;
    expect(t.area_vs_tips_supplied.exponent!).toBeCloseTo(1, 12);
    expect(t.area_vs_tips_supplied.pipe_model_inside_ci95).toBe(true);
  });

  it('counts excluded furcations by reason: unreliable segments, thin children, a thicker child, thinner children', () => {
    const net = exactExponentNetwork({ exponent: 2.5, depth: 3, segmentsPerInternode: 3 });
    const segs = net.segments;
    const childrenOf = (id: number) => segs.filter((s) => s.parentId === id);
    const furcationParents = segs.filter((s) => childrenOf(s.segmentId).length >= 2);
    const internode = (start: number) => {
      const out = [start];
      for (let c = childrenOf(start); c.length === 1; c = childrenOf(c[0].segmentId)) out.push(c[0].segmentId);
      return out;
    };
    const [f0, f1, f2, f3] = furcationParents.slice(3);
    // f0: every segment of its first child's internode unreliable
    for (const id of internode(childrenOf(f0.segmentId)[0].segmentId)) Object.assign(segs[id], { reliable: false, reliabilityReason: 'thin_arc' });
    // f1: first child thinner than min radius
    for (const id of internode(childrenOf(f1.segmentId)[0].segmentId)) segs[id].radiusM = 0.0005;
    // f2: first child thicker than the parent
    for (const id of internode(childrenOf(f2.segmentId)[0].segmentId)) segs[id].radiusM = f2.radiusM * 1.2;
    // f3: both children very thin relative to the parent (Σ r_i ≤ r_0), yet above min radius
    for (const c of childrenOf(f3.segmentId)) for (const id of internode(c.segmentId)) segs[id].radiusM = f3.radiusM * 0.3;
    const e = analyseScaling(net, { ...fast, unsolvable: 'excluded' }).summary.exponent;
    expect(e.excluded_by_reason.unreliable_segments).toBe(1);
    expect(e.excluded_by_reason.below_min_radius).toBe(1);
    expect(e.excluded_by_reason.child_thicker).toBeGreaterThanOrEqual(1);
    expect(e.excluded_by_reason.children_thinner).toBeGreaterThanOrEqual(1);
    expect(e.n_used + e.n_excluded).toBe(e.n_furcations);
    expect(e.n_excluded).toBeGreaterThanOrEqual(4);
    // By default the unsolvable ones are kept as censored values instead, and counted as such.
    const c = analyseScaling(net, fast).summary.exponent;
    expect(c.excluded_by_reason.child_thicker + c.excluded_by_reason.children_thinner).toBe(0);
    expect(c.censored_by_reason.child_thicker).toBe(e.excluded_by_reason.child_thicker);
    expect(c.censored_by_reason.children_thinner).toBe(e.excluded_by_reason.children_thinner);
    expect(c.n_used).toBe(e.n_used + c.censored_by_reason.child_thicker + c.censored_by_reason.children_thinner + c.censored_by_reason.above_range);
  });

  it('is repeatable: the same seed gives an identical summary', () => {
    const net: Network = exactExponentNetwork({ exponent: 2.2, depth: 4, leaderShare: 0.7 });
    net.segments.forEach((s, i) => {
      s.radiusSeM = 0.03 * s.radiusM;
      s.radiusM *= 1 + 0.03 * Math.sin(7 * i);
    });
    expect(analyseScaling(net, { ...fast, seed: 5 }).summary).toEqual(analyseScaling(net, { ...fast, seed: 5 }).summary);
  });

  it('reports a significant trend when the exponent rises with branching order', () => {
    // Build a tree whose furcations at deeper levels have larger exponents: re-scale the children
    // of each furcation by hand with a = 2 + 0.4·order.
    const net = exactExponentNetwork({ exponent: 2, depth: 5, segmentsPerInternode: 1 });
    const segs = net.segments;
    const kids = (id: number) => segs.filter((s) => s.parentId === id);
    const level = new Map<number, number>([[0, 0]]);
    for (const s of segs) if (s.parentId >= 0) level.set(s.segmentId, level.get(s.parentId)! + 1);
    for (const s of segs) {
      const c = kids(s.segmentId);
      if (c.length === 2) {
        const a = 2 + 0.4 * level.get(s.segmentId)!;
        for (const k of c) k.radiusM = s.radiusM * 0.5 ** (1 / a);
      }
    }
    const { summary } = analyseScaling(net, { ...fast, permutations: 999, joint_skip_segments: 0, radius_window_segments: 1 });
    const t = summary.trend.find((x) => x.variable === 'strahler_order')!;
    // Strahler order falls as depth rises, so the exponent falls with Strahler order.
    expect(t.spearman_rho!).toBeLessThan(-0.8);
    expect(t.p_value!).toBeLessThan(0.01);
    expect(summary.by_order.filter((r) => r.grouping === 'strahler_order').length).toBe(5);
  });
});

describe('analyseMeasuredFurcations', () => {
  it('solves field-measured diameters: parent 10 cm, children 10/√2 cm → a = 2', () => {
    const d = 0.1 / Math.SQRT2;
    const text = `furcation_id,role,diameter_m,diameter_se_m,order\n1,parent,0.1,0,0\n1,child,${d},0\n1,child,${d},0\n2,parent,0.2,0,1\n2,child,${0.2 * 2 ** (-1 / 3)},0\n2,child,${0.2 * 2 ** (-1 / 3)},0\n`;
    const { summary, furcationRows } = analyseMeasuredFurcations(parseMeasuredFurcations(text), fast);
    expect(furcationRows.map((r) => r.exponent)[0]).toBeCloseTo(2, 12);
    expect(furcationRows.map((r) => r.exponent)[1]).toBeCloseTo(3, 12);
    expect(summary.exponent.n_used).toBe(2);
    expect(summary.taper).toBeNull();
  });
});

describe('parseMeasuredFurcations', () => {
  it('rejects a furcation with a single child, naming the furcation', () => {
    expect(() => parseMeasuredFurcations('furcation_id,role,diameter_m\n7,parent,0.1\n7,child,0.05\n')).toThrow(/furcation 7 .* 1 child/);
  });

  it('rejects an unknown role with the line number', () => {
    expect(() => parseMeasuredFurcations('furcation_id,role,diameter_m\n7,stem,0.1\n')).toThrow(/line 2: role must be parent or child/);
  });

  it('rejects a non-positive diameter', () => {
    expect(() => parseMeasuredFurcations('furcation_id,role,diameter_m\n7,parent,-1\n')).toThrow(/diameter_m must be > 0/);
  });

  it('rejects a table without the required columns', () => {
    expect(() => parseMeasuredFurcations('id,diameter\n1,2\n')).toThrow(/not a measured-furcations table/);
  });
});

describe('parseEdges', () => {
  it('rejects decreasing or non-numeric class edges', () => {
    expect(() => parseEdges('0.05,0.01')).toThrow(/increasing/);
    expect(() => parseEdges('0.01,abc')).toThrow(/increasing/);
    expect(parseEdges('0.01, 0.025')).toEqual([0.01, 0.025]);
  });
});

describe('radiusClass', () => {
  it('labels radii by class with open ends', () => {
    const e = [0.01, 0.025];
    expect([radiusClass(0.005, e), radiusClass(0.01, e), radiusClass(0.03, e), radiusClass(NaN, e)]).toEqual(['<0.01', '0.01-0.025', '>=0.025', null]);
  });
});
