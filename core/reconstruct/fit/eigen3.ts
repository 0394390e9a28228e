/**
 * Closed-form eigen decomposition of a real symmetric 3×3 matrix.
 *
 * Eigenvalues come from the trigonometric solution of the characteristic cubic of the shifted,
 * scaled matrix B = (A − qI)/p (Smith 1961, Commun. ACM 4:168). The eigenvalue that is well
 * separated from the other two (the largest when det(B)/2 ≥ 0, else the smallest) is accurate to
 * machine precision; its eigenvector is the longest cross product of two rows of A − λI.
 * The other two eigenvectors are found by solving the 2×2 symmetric problem that A induces on the
 * plane orthogonal to that vector with one Jacobi rotation, which stays accurate when the two
 * remaining eigenvalues are equal or nearly so (where the cubic's roots lose half their digits).
 * Eigenvalues are then the Rayleigh quotients of the final vectors.
 *
 * Called per point for neighbourhood features on millions of points, so it allocates nothing.
 */

/**
 * Eigen decomposition of the symmetric matrix [[a00,a01,a02],[a01,a11,a12],[a02,a12,a22]].
 *
 * Writes into `out` (length ≥ 12): out[0..2] eigenvalues ascending; out[3..5], out[6..8],
 * out[9..11] the matching unit eigenvectors, forming a right-handed orthonormal basis.
 * Non-finite input yields NaN output (callers must check); it never throws.
 *
 * @example
 * const e = new Float64Array(12);
 * eigenSymmetric3(2, 0, 0, 3, 0, 1, e); // e[0..2] = 1, 2, 3
 */
export function eigenSymmetric3(
  a00: number,
  a01: number,
  a02: number,
  a11: number,
  a12: number,
  a22: number,
  out: Float64Array,
): void {
  // Scale by the largest entry so squares and cubes neither overflow nor underflow.
  const m = Math.max(Math.abs(a00), Math.abs(a01), Math.abs(a02), Math.abs(a11), Math.abs(a12), Math.abs(a22));
  if (!(m > 0)) {
    if (m === 0) {
      writeIdentity(out, 0, 0, 0);
    } else {
      out.fill(NaN, 0, 12);
    }
    return;
  }
  if (!Number.isFinite(m)) {
    out.fill(NaN, 0, 12);
    return;
  }
  const s = 1 / m;
  a00 *= s;
  a01 *= s;
  a02 *= s;
  a11 *= s;
  a12 *= s;
  a22 *= s;

  const off = a01 * a01 + a02 * a02 + a12 * a12;
  if (off === 0) {
    sortDiagonal(a00 * m, a11 * m, a22 * m, out);
    return;
  }

  const q = (a00 + a11 + a22) / 3;
  const b00 = a00 - q;
  const b11 = a11 - q;
  const b22 = a22 - q;
  const p = Math.sqrt((b00 * b00 + b11 * b11 + b22 * b22 + 2 * off) / 6);
  // det(B)/2 with B = (A − qI)/p
  const detB =
    b00 * (b11 * b22 - a12 * a12) - a01 * (a01 * b22 - a12 * a02) + a02 * (a01 * a12 - b11 * a02);
  let halfDet = detB / (2 * p * p * p);
  if (halfDet > 1) halfDet = 1;
  else if (halfDet < -1) halfDet = -1;
  const phi = Math.acos(halfDet) / 3;
  // Roots of the cubic are β_k = 2 cos(φ + 2πk/3), β0 ≤ β1 ≤ β2 with β2 = 2 cos φ. Only the
  // separated one is needed: the largest if halfDet ≥ 0 (the pair sits low), else the smallest.
  const sepHigh = halfDet >= 0;
  const lam = q + p * 2 * Math.cos(sepHigh ? phi : phi + (2 * Math.PI) / 3);

  // Eigenvector of the separated eigenvalue: longest cross product of rows of A − λI.
  const r00 = a00 - lam;
  const r11 = a11 - lam;
  const r22 = a22 - lam;
  // rows: (r00, a01, a02), (a01, r11, a12), (a02, a12, r22)
  const c0x = a01 * a12 - a02 * r11;
  const c0y = a02 * a01 - r00 * a12;
  const c0z = r00 * r11 - a01 * a01;
  const c1x = a01 * r22 - a02 * a12;
  const c1y = a02 * a02 - r00 * r22;
  const c1z = r00 * a12 - a01 * a02;
  const c2x = r11 * r22 - a12 * a12;
  const c2y = a12 * a02 - a01 * r22;
  const c2z = a01 * a12 - r11 * a02;
  const n0 = c0x * c0x + c0y * c0y + c0z * c0z;
  const n1 = c1x * c1x + c1y * c1y + c1z * c1z;
  const n2 = c2x * c2x + c2y * c2y + c2z * c2z;
  let wx: number;
  let wy: number;
  let wz: number;
  let wn: number;
  if (n0 >= n1 && n0 >= n2) {
    wx = c0x;
    wy = c0y;
    wz = c0z;
    wn = n0;
  } else if (n1 >= n2) {
    wx = c1x;
    wy = c1y;
    wz = c1z;
    wn = n1;
  } else {
    wx = c2x;
    wy = c2y;
    wz = c2z;
    wn = n2;
  }
  if (!(wn > 0)) {
    // All three eigenvalues equal to working precision (A ≈ λI); any basis will do.
    writeIdentity(out, a00 * m, a11 * m, a22 * m);
    sortInPlace(out);
    return;
  }
  const wInv = 1 / Math.sqrt(wn);
  wx *= wInv;
  wy *= wInv;
  wz *= wInv;

  // Orthonormal U, V spanning the plane orthogonal to W.
  let ux: number;
  let uy: number;
  let uz: number;
  if (Math.abs(wx) > Math.abs(wy)) {
    const inv = 1 / Math.sqrt(wx * wx + wz * wz);
    ux = -wz * inv;
    uy = 0;
    uz = wx * inv;
  } else {
    const inv = 1 / Math.sqrt(wy * wy + wz * wz);
    ux = 0;
    uy = wz * inv;
    uz = -wy * inv;
  }
  const vx = wy * uz - wz * uy;
  const vy = wz * ux - wx * uz;
  const vz = wx * uy - wy * ux;

  // 2×2 matrix [[muu, muv], [muv, mvv]] of A restricted to span{U, V}.
  const aux = a00 * ux + a01 * uy + a02 * uz;
  const auy = a01 * ux + a11 * uy + a12 * uz;
  const auz = a02 * ux + a12 * uy + a22 * uz;
  const avx = a00 * vx + a01 * vy + a02 * vz;
  const avy = a01 * vx + a11 * vy + a12 * vz;
  const avz = a02 * vx + a12 * vy + a22 * vz;
  const muu = ux * aux + uy * auy + uz * auz;
  const muv = ux * avx + uy * avy + uz * avz;
  const mvv = vx * avx + vy * avy + vz * avz;
  // One Jacobi rotation diagonalises it (Golub & Van Loan, Matrix Computations, §8.5.2).
  let c = 1;
  let sn = 0;
  if (muv !== 0) {
    const tau = (mvv - muu) / (2 * muv);
    const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
    c = 1 / Math.sqrt(1 + t * t);
    sn = t * c;
  }
  // Rotated vectors: e1 = cU − sV, e2 = sU + cV.
  const e1x = c * ux - sn * vx;
  const e1y = c * uy - sn * vy;
  const e1z = c * uz - sn * vz;
  const e2x = sn * ux + c * vx;
  const e2y = sn * uy + c * vy;
  const e2z = sn * uz + c * vz;
  const l1 = rayleigh(a00, a01, a02, a11, a12, a22, e1x, e1y, e1z);
  const l2 = rayleigh(a00, a01, a02, a11, a12, a22, e2x, e2y, e2z);
  const lw = rayleigh(a00, a01, a02, a11, a12, a22, wx, wy, wz);

  // Order the three (value, vector) pairs ascending.
  let loX = e1x;
  let loY = e1y;
  let loZ = e1z;
  let lo = l1;
  let hiX = e2x;
  let hiY = e2y;
  let hiZ = e2z;
  let hi = l2;
  if (lo > hi) {
    lo = l2;
    loX = e2x;
    loY = e2y;
    loZ = e2z;
    hi = l1;
    hiX = e1x;
    hiY = e1y;
    hiZ = e1z;
  }
  if (sepHigh && lw >= hi) {
    put(out, 0, lo * m, loX, loY, loZ);
    put(out, 1, hi * m, hiX, hiY, hiZ);
    put(out, 2, lw * m, wx, wy, wz);
  } else if (!sepHigh && lw <= lo) {
    put(out, 0, lw * m, wx, wy, wz);
    put(out, 1, lo * m, loX, loY, loZ);
    put(out, 2, hi * m, hiX, hiY, hiZ);
  } else {
    // Rounding put the separated value inside the pair (only possible for a near-triple root).
    put(out, 0, lo * m, loX, loY, loZ);
    put(out, 1, hi * m, hiX, hiY, hiZ);
    put(out, 2, lw * m, wx, wy, wz);
    sortInPlace(out);
  }
  // Make the basis right-handed: v2 = v0 × v1.
  const hx = out[4] * out[8] - out[5] * out[7];
  const hy = out[5] * out[6] - out[3] * out[8];
  const hz = out[3] * out[7] - out[4] * out[6];
  if (hx * out[9] + hy * out[10] + hz * out[11] < 0) {
    out[9] = -out[9];
    out[10] = -out[10];
    out[11] = -out[11];
  }
}

function rayleigh(
  a00: number,
  a01: number,
  a02: number,
  a11: number,
  a12: number,
  a22: number,
  x: number,
  y: number,
  z: number,
): number {
  return (
    a00 * x * x + a11 * y * y + a22 * z * z + 2 * (a01 * x * y + a02 * x * z + a12 * y * z)
  );
}

function put(out: Float64Array, k: number, value: number, x: number, y: number, z: number): void {
  out[k] = value;
  out[3 + 3 * k] = x;
  out[4 + 3 * k] = y;
  out[5 + 3 * k] = z;
}

function writeIdentity(out: Float64Array, d0: number, d1: number, d2: number): void {
  out[0] = d0;
  out[1] = d1;
  out[2] = d2;
  out[3] = 1;
  out[4] = 0;
  out[5] = 0;
  out[6] = 0;
  out[7] = 1;
  out[8] = 0;
  out[9] = 0;
  out[10] = 0;
  out[11] = 1;
}

function sortDiagonal(d0: number, d1: number, d2: number, out: Float64Array): void {
  writeIdentity(out, d0, d1, d2);
  sortInPlace(out);
}

/** Sort the three (value, vector) pairs in `out` ascending by value (insertion sort, 3 items). */
function sortInPlace(out: Float64Array): void {
  for (let i = 1; i < 3; i++) {
    for (let j = i; j > 0 && out[j - 1] > out[j]; j--) swapPair(out, j - 1, j);
  }
  // keep right-handed after swaps
  const hx = out[4] * out[8] - out[5] * out[7];
  const hy = out[5] * out[6] - out[3] * out[8];
  const hz = out[3] * out[7] - out[4] * out[6];
  if (hx * out[9] + hy * out[10] + hz * out[11] < 0) {
    out[9] = -out[9];
    out[10] = -out[10];
    out[11] = -out[11];
  }
}

function swapPair(out: Float64Array, i: number, j: number): void {
  let t = out[i];
  out[i] = out[j];
  out[j] = t;
  for (let k = 0; k < 3; k++) {
    t = out[3 + 3 * i + k];
    out[3 + 3 * i + k] = out[3 + 3 * j + k];
    out[3 + 3 * j + k] = t;
  }
}
