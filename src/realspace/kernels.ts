/**
 * WebAssembly SIMD kernels of the real-space invariants, assembled with the emitter of
 * src/linalg/simd.ts (a module and memory of their own, same sharing rules; 8 kB, compiled
 * synchronously in Node, a Web Worker or a shard, where real-space computations run).
 *
 * chebyshevStep (kpm.ts): one step of the Chebyshev recursion for a batch of k vectors at once,
 *   next_j = f (H cur_j) - f shift cur_j - prev_j,   out_{j,t} += coef_{j,t} next_j,
 * H in CSR form (sparse.ts). The batch reads the matrix (most of the memory traffic: 20 bytes per
 * entry) once for its k vectors; the vector updates are fused into the same pass. One complex
 * number per f64x2 register: H_ie x_c = vr (xr, xi) + vi (-xi, xr), the second term accumulated as
 * vi (xr, xi) and its lanes swapped once per row.
 */
import { assemble, Body, F64, I32, V128, workspaces } from '../linalg/simd.js';

/** Largest batch of vectors, of outputs per vector, and of outputs in all, of a Chebyshev step. */
export const MAX_BATCH = 4;
export const MAX_OUTPUTS = 2;
export const MAX_TOTAL_OUTPUTS = 4;

type Kernel = (...args: number[]) => void;

/** Kernels by name: `product`, and `step${k}x${q}` for k vectors with q outputs each. */
export type RealspaceKernels = Record<string, Kernel>;

/**
 * step(rowStart, columns, values, n, f, fShift, [cur_j, prev_j, next_j] for j < k,
 * out_{j,t} for j < k, t < q, coef_{j,t} likewise): addresses in bytes; rowStart and columns
 * i32, values and vectors complex (16 bytes per entry, 16-byte aligned).
 */
function chebyshevStep(k: number, q: number): Body {
  const params = [I32, I32, I32, I32, F64, F64, ...new Array<number>(3 * k + k * q).fill(I32), ...new Array<number>(k * q).fill(F64)];
  const f = new Body(params);
  const [rowStart, columns, values, n, fScale, fShift] = [0, 1, 2, 3, 4, 5];
  const vec = (j: number, which: 0 | 1 | 2) => 6 + 3 * j + which;
  const out = (j: number, t: number) => 6 + 3 * k + j * q + t;
  const coefParam = (j: number, t: number) => 6 + 3 * k + k * q + j * q + t;
  const i = f.local(I32), iEnd = f.local(I32), rs = f.local(I32);
  const ce = f.local(I32), ceEnd = f.local(I32), ve = f.local(I32), c = f.local(I32);
  const vr = f.local(V128), vi = f.local(V128), x = f.local(V128), y = f.local(V128);
  const fv = f.local(V128), fpm = f.local(V128), fsv = f.local(V128);
  const acc1 = Array.from({ length: k }, () => f.local(V128));
  const acc2 = Array.from({ length: k }, () => f.local(V128));
  const coef = Array.from({ length: k * q }, () => f.local(V128));
  f.get(fScale).splat().set(fv);
  f.get(fScale).fneg().plusMinus().set(fpm); // (-f, f)
  f.get(fShift).splat().set(fsv);
  for (let j = 0; j < k; j++) for (let t = 0; t < q; t++) f.get(coefParam(j, t)).splat().set(coef[j * q + t]);
  // ce, ve: the first entry of row 0; rs: where row 1 starts.
  f.get(rowStart).op(0x28, 2, 0).set(c);
  f.get(columns).get(c).i32(4).mul().add().set(ce);
  f.get(values).get(c).i32(16).mul().add().set(ve);
  f.get(rowStart).i32(4).add().set(rs);
  f.i32(0).set(i).get(n).i32(16).mul().set(iEnd);
  f.forBytes(i, iEnd, 16, () => {
    for (let j = 0; j < k; j++) f.vzero().set(acc1[j]).vzero().set(acc2[j]);
    f.get(columns).get(rs).op(0x28, 2, 0).i32(4).mul().add().set(ceEnd);
    f.get(rs).i32(4).add().set(rs);
    f.forBytes(ce, ceEnd, 4, () => {
      f.get(ce).op(0x28, 2, 0).i32(4).op(0x74).set(c); // column * 16
      f.get(ve).simd(0x0a, 3, 0).set(vr); // load64_splat
      f.get(ve).simd(0x0a, 3, 8).set(vi);
      for (let j = 0; j < k; j++) {
        f.get(vec(j, 0)).get(c).add().vload().set(x);
        f.get(vr).get(x).accumulate(acc1[j]);
        f.get(vi).get(x).accumulate(acc2[j]);
      }
      f.get(ve).i32(16).add().set(ve);
    });
    for (let j = 0; j < k; j++) {
      // y = f acc1 + (-f, f) swap(acc2) - f shift cur - prev
      f.get(acc1[j]).get(fv).vmul();
      f.swapped(acc2[j]).get(fpm).vmul().vadd();
      f.get(vec(j, 0)).get(i).add().vload().get(fsv).vmul().vsub();
      f.get(vec(j, 1)).get(i).add().vload().vsub().set(y);
      f.get(vec(j, 2)).get(i).add().get(y).vstore();
      for (let t = 0; t < q; t++) {
        f.get(out(j, t)).get(i).add();
        f.get(out(j, t)).get(i).add().vload().get(coef[j * q + t]).get(y).vmul().vadd();
        f.vstore();
      }
    }
  });
  return f;
}

/**
 * product(a, lda, b, ldb, c, ldc, p, q, r): C += A B for complex row-major blocks (A p x q,
 * B q x r, C p x r; row strides in bytes). Register tile: 2 rows of C by 2 columns, each complex
 * product as ar (br, bi) + ai (br, bi) lanes swapped at the end (8 f64x2 accumulators).
 */
function complexProduct(): Body {
  const [a, lda, b, ldb, c, ldc, p, q, r] = [0, 1, 2, 3, 4, 5, 6, 7, 8];
  const f = new Body([I32, I32, I32, I32, I32, I32, I32, I32, I32]);
  const i = f.local(I32), iEnd = f.local(I32), j = f.local(I32), jEnd = f.local(I32);
  const pa = f.local(I32), paEnd = f.local(I32), pb = f.local(I32), pc = f.local(I32);
  const bv = [f.local(V128), f.local(V128)];
  const sp = f.local(V128), pm = f.local(V128);
  const acc = Array.from({ length: 8 }, () => f.local(V128));
  f.f64(-1).plusMinus().set(pm); // (-1, 1)
  const tile = (rows: number, cols: number): void => {
    for (let rr = 0; rr < rows; rr++) for (let t = 0; t < 2 * cols; t++) f.vzero().set(acc[4 * rr + t]);
    f.get(a).get(i).get(lda).mul().add().set(pa);
    f.get(pa).get(q).i32(16).mul().add().set(paEnd);
    f.get(b).get(j).i32(16).mul().add().set(pb);
    f.forBytes(pa, paEnd, 16, () => {
      for (let cc = 0; cc < cols; cc++) f.get(pb).vload(16 * cc).set(bv[cc]);
      for (let rr = 0; rr < rows; rr++) {
        for (let part = 0; part < 2; part++) {
          f.get(pa);
          if (rr > 0) f.get(lda).add();
          f.simd(0x0a, 3, 8 * part).set(sp); // load64_splat of the real, then the imaginary part
          for (let cc = 0; cc < cols; cc++) f.get(sp).get(bv[cc]).accumulate(acc[4 * rr + 2 * cc + part]);
        }
      }
      f.get(pb).get(ldb).add().set(pb);
    });
    for (let rr = 0; rr < rows; rr++) {
      for (let cc = 0; cc < cols; cc++) {
        f.get(c).get(i).i32(rr).add().get(ldc).mul().add().get(j).i32(cc).add().i32(16).mul().add().set(pc);
        f.get(pc).get(pc).vload().get(acc[4 * rr + 2 * cc]).vadd();
        f.swapped(acc[4 * rr + 2 * cc + 1]).get(pm).vmul().vadd().vstore();
      }
    }
  };
  const columns = (rows: number): void => {
    f.i32(0).set(j);
    f.get(r).i32(1).sub().set(jEnd);
    f.whileLess(j, jEnd, () => {
      tile(rows, 2);
      f.get(j).i32(2).add().set(j);
    });
    f.get(j).get(r).op(0x48).when(() => tile(rows, 1)); // j < r (signed)
  };
  f.i32(0).set(i);
  f.get(p).i32(1).sub().set(iEnd);
  f.whileLess(i, iEnd, () => {
    columns(2);
    f.get(i).i32(2).add().set(i);
  });
  f.get(i).get(p).op(0x48).when(() => columns(1));
  return f;
}

/**
 * realProduct(a, lda, b, ldb, c, ldc, p, q, r, panel, aPanel, step): C += A B for real blocks (C
 * p x r row-major, r even; strides in bytes). B (q x r) is read in panels of 4 columns: entry
 * (k, j) at b + (j / 4) panel + k ldb + 8 (j % 4), so a row-major B has panel = 32, and a packed
 * one (each panel's rows contiguous) ldb = 32, panel = 32 q. A (p x q) likewise in panels of 4
 * rows: entry (i, k) at a + (i / 4) aPanel + (i % 4) lda + k step, so a row-major A has
 * aPanel = 4 lda and step = 8, and one stored as the panels of its transpose lda = 8, step = 32.
 * Register tile: 4 rows of C by 4 columns (8 f64x2 accumulators); then 2 columns, then single rows.
 */
function realBlockProduct(): Body {
  const [a, lda, b, ldb, c, ldc, p, q, r, panel, aPanel, step] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11];
  const f = new Body(new Array<number>(12).fill(I32));
  const i = f.local(I32), iEnd = f.local(I32), j = f.local(I32), jEnd = f.local(I32);
  const pa = f.local(I32), paEnd = f.local(I32), pb = f.local(I32), pc = f.local(I32), lda2 = f.local(I32), lda3 = f.local(I32);
  const bv = [f.local(V128), f.local(V128)];
  const sp = f.local(V128);
  const acc = Array.from({ length: 8 }, () => f.local(V128));
  f.get(lda).i32(2).mul().set(lda2);
  f.get(lda).i32(3).mul().set(lda3);
  const rowOffset = [null, lda, lda2, lda3];
  const tile = (rows: number, vecs: number): void => {
    for (let t = 0; t < rows; t++) for (let v = 0; v < vecs; v++) f.vzero().set(acc[2 * t + v]);
    // row i at a + (i / 4) aPanel + (i % 4) lda
    f.get(a).get(i).i32(2).op(0x76).get(aPanel).mul().add().get(i).i32(3).and().get(lda).mul().add().set(pa);
    f.get(pa).get(q).get(step).mul().add().set(paEnd);
    f.get(b).get(j).i32(2).op(0x76).get(panel).mul().add().set(pb); // j / 4 (j a multiple of 4)
    f.forBytes(pa, paEnd, [step], () => {
      for (let v = 0; v < vecs; v++) f.get(pb).vload(16 * v).set(bv[v]);
      for (let t = 0; t < rows; t++) {
        f.get(pa);
        const o = rowOffset[t];
        if (o !== null) f.get(o).add();
        f.simd(0x0a, 3, 0).set(sp);
        for (let v = 0; v < vecs; v++) f.get(sp).get(bv[v]).accumulate(acc[2 * t + v]);
      }
      f.get(pb).get(ldb).add().set(pb);
    });
    for (let t = 0; t < rows; t++) {
      f.get(c).get(i).i32(t).add().get(ldc).mul().add().get(j).i32(8).mul().add().set(pc);
      for (let v = 0; v < vecs; v++) f.get(pc).get(pc).vload(16 * v).get(acc[2 * t + v]).vadd().vstore(16 * v);
    }
  };
  const columns = (rows: number): void => {
    f.i32(0).set(j);
    f.get(r).i32(3).sub().set(jEnd);
    f.whileLess(j, jEnd, () => {
      tile(rows, 2);
      f.get(j).i32(4).add().set(j);
    });
    f.get(j).get(r).op(0x48).when(() => tile(rows, 1)); // two columns left (r even)
  };
  f.i32(0).set(i);
  f.get(p).i32(3).sub().set(iEnd);
  f.whileLess(i, iEnd, () => {
    columns(4);
    f.get(i).i32(4).add().set(i);
  });
  f.get(p).set(iEnd);
  f.whileLess(i, iEnd, () => {
    columns(1);
    f.get(i).i32(1).add().set(i);
  });
  return f;
}

/**
 * gramCombine(p1, p2, p3, ar, ai, br, bi, bytes, c, s): over `bytes` bytes of seven real arrays
 * laid out alike, R = p1 + p2 and I = (p3 - p1) + p2 (a Hermitian Gram block from its three real
 * products, see simdGramSum), then ar += c R, ai += c I, br += s R, bi += s I, and p1 = p2 = p3 = 0
 * for the next group.
 */
function gramCombine(): Body {
  const [p1, p2, p3, ar, ai, br, bi, bytes, c, s] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9];
  const f = new Body([I32, I32, I32, I32, I32, I32, I32, I32, F64, F64]);
  const o = f.local(I32);
  const [cv, sv, x1, x2, re, im] = [f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128)];
  f.get(c).splat().set(cv);
  f.get(s).splat().set(sv);
  f.i32(0).set(o);
  f.forBytes(o, bytes, 16, () => {
    f.get(p1).get(o).add().vload().set(x1);
    f.get(p2).get(o).add().vload().set(x2);
    f.get(x1).get(x2).vadd().set(re);
    f.get(p3).get(o).add().vload().get(x1).vsub().get(x2).vadd().set(im);
    for (const at of [p1, p2, p3]) f.get(at).get(o).add().vzero().vstore();
    for (const [out, w, part] of [[ar, cv, re], [ai, cv, im], [br, sv, re], [bi, sv, im]]) {
      f.get(out).get(o).add();
      f.get(out).get(o).add().vload().get(w).get(part).vmul().vadd();
      f.vstore();
    }
  });
  return f;
}

function moduleBytes(): Uint8Array {
  const kernels: [string, Body][] = [['product', complexProduct()], ['realProduct', realBlockProduct()], ['gramCombine', gramCombine()]];
  for (let k = 1; k <= MAX_BATCH; k++) for (let q = 1; q <= MAX_OUTPUTS && k * q <= MAX_TOTAL_OUTPUTS; q++) kernels.push([`step${k}x${q}`, chebyshevStep(k, q)]);
  return assemble(kernels);
}

/** The kernels and a memory of at least `bytes` bytes (shared; see src/linalg/simd.ts). */
export const realspaceWorkspace = workspaces<RealspaceKernels>(moduleBytes);

/** Depth and columns of a product's blocks: a block of B (256 KiB) stays in cache while every row of A passes it. */
const DEPTH_BLOCK = 256;
const COLUMN_BLOCK = 64;

/** C += A B on the complex kernel, block by block (byte addresses; rows of q and r entries). */
function blockedComplex(kernels: RealspaceKernels, aAt: number, bAt: number, cAt: number, p: number, q: number, r: number): void {
  for (let k0 = 0; k0 < q; k0 += DEPTH_BLOCK) {
    const depth = Math.min(DEPTH_BLOCK, q - k0);
    for (let j0 = 0; j0 < r; j0 += COLUMN_BLOCK) {
      kernels.product(aAt + 16 * k0, 16 * q, bAt + 16 * (k0 * r + j0), 16 * r, cAt + 16 * j0, 16 * r, p, depth, Math.min(COLUMN_BLOCK, r - j0));
    }
  }
}

/**
 * C += A B on the real kernel, block by block (byte addresses; rows of q and r entries, r a
 * multiple of 4): each block of B is first packed (at packAt, in `memory`) into panels of 4
 * columns whose rows are contiguous, so that the kernel reads it as one stream.
 */
function blockedReal(kernels: RealspaceKernels, memory: ArrayBuffer, aAt: number, bAt: number, cAt: number, packAt: number, p: number, q: number, r: number): void {
  const b = new Float64Array(memory, bAt, q * r), pack = new Float64Array(memory, packAt, PACK);
  for (let k0 = 0; k0 < q; k0 += DEPTH_BLOCK) {
    const depth = Math.min(DEPTH_BLOCK, q - k0);
    for (let j0 = 0; j0 < r; j0 += 2 * COLUMN_BLOCK) {
      const cols = Math.min(2 * COLUMN_BLOCK, r - j0);
      for (let k = 0; k < depth; k++) {
        const from = (k0 + k) * r + j0;
        for (let j = 0; j < cols; j++) pack[(j >> 2) * 4 * depth + 4 * k + (j & 3)] = b[from + j];
      }
      kernels.realProduct(aAt + 8 * k0, 8 * q, packAt, 32, cAt + 8 * j0, 8 * r, p, depth, cols, 32 * depth, 32 * q, 8);
    }
  }
}

/** Doubles of a packed block of B. */
const PACK = DEPTH_BLOCK * 2 * COLUMN_BLOCK;

/**
 * out (p x r) = A (p x q) B (q x r), complex interleaved row-major, on the SIMD kernels: `fillA`
 * and `fillB` write A and B into the views they are given (so a caller can write A^dagger or D B
 * there directly). Large products take three real products instead of four complex ones
 * (A = X + iY, B = U + iV: XU, YV and (X + Y)(U + V); Re = XU - YV, Im = (X + Y)(U + V) - XU - YV),
 * a quarter fewer operations; the imaginary part is then accurate to eps |A| |B| normwise, as the
 * direct product's (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 23.2.4).
 * Returns out.
 */
export function simdProduct(p: number, q: number, r: number, fillA: (view: Float64Array) => void, fillB: (view: Float64Array) => void, out: Float64Array): Float64Array {
  if (p * q * r < THREE_REAL) {
    const aAt = 0, bAt = 16 * p * q, cAt = bAt + 16 * q * r;
    const { kernels, memory } = realspaceWorkspace(cAt + 16 * p * r);
    fillA(new Float64Array(memory, aAt, 2 * p * q));
    fillB(new Float64Array(memory, bAt, 2 * q * r));
    const c = new Float64Array(memory, cAt, 2 * p * r);
    c.fill(0);
    blockedComplex(kernels, aAt, bAt, cAt, p, q, r);
    out.set(c);
    return out;
  }
  // Planar parts (rows of B and C padded to a multiple of 4), the packed block, the interleaved scratch.
  const re = (r + 3) & ~3;
  const at = { x: 0, y: 8 * p * q, xy: 16 * p * q, u: 24 * p * q, v: 24 * p * q + 8 * q * re, uv: 24 * p * q + 16 * q * re, t: 24 * p * q + 24 * q * re };
  const packAt = at.t + 24 * p * re, scratch = packAt + 8 * PACK;
  const { kernels, memory } = realspaceWorkspace(scratch + 16 * Math.max(p * q, q * r));
  const view = (byte: number, length: number) => new Float64Array(memory, byte, length);
  const s = view(scratch, 2 * Math.max(p * q, q * r));
  fillA(s.subarray(0, 2 * p * q));
  const x = view(at.x, p * q), y = view(at.y, p * q), xy = view(at.xy, p * q);
  for (let e = 0; e < p * q; e++) {
    x[e] = s[2 * e];
    y[e] = s[2 * e + 1];
    xy[e] = s[2 * e] + s[2 * e + 1];
  }
  fillB(s.subarray(0, 2 * q * r));
  const u = view(at.u, q * re), v = view(at.v, q * re), uv = view(at.uv, q * re);
  for (let k = 0; k < q; k++) {
    for (let j = 0; j < r; j++) {
      const e = k * r + j, o = k * re + j;
      u[o] = s[2 * e];
      v[o] = s[2 * e + 1];
      uv[o] = s[2 * e] + s[2 * e + 1];
    }
    for (let j = r; j < re; j++) u[k * re + j] = v[k * re + j] = uv[k * re + j] = 0;
  }
  const t = view(at.t, 3 * p * re);
  t.fill(0);
  blockedReal(kernels, memory, at.x, at.u, at.t, packAt, p, q, re);
  blockedReal(kernels, memory, at.y, at.v, at.t + 8 * p * re, packAt, p, q, re);
  blockedReal(kernels, memory, at.xy, at.uv, at.t + 16 * p * re, packAt, p, q, re);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < r; j++) {
      const o = i * re + j, t1 = t[o], t2 = t[p * re + o], t3 = t[2 * p * re + o];
      out[2 * (i * r + j)] = t1 - t2;
      out[2 * (i * r + j) + 1] = t3 - t1 - t2;
    }
  }
  return out;
}

/**
 * Rows and columns of an output tile of simdGramSum: its products and sums (7 x 32 KiB) stay in
 * cache, and the triangle is covered with little waste (64 beat 128 by 5 %, measured).
 */
const GRAM_TILE = 64;

/**
 * out (m x m) = sum_g w_g Psi_g^dagger Psi_g, Psi_g the rows of the n x m frame `psi` (complex
 * interleaved, row i = orbital i) listed in order[starts[g] .. starts[g + 1]), w_g = wr[g] + i wi[g]:
 * Psi^dagger D Psi for a diagonal D that takes few values (one per group). Each Gram matrix
 * G_g = Psi_g^dagger Psi_g is Hermitian, so only its upper triangle is formed, by three real products
 * of the parts X, Y of Psi_g (as in simdProduct: XX = X^T X, YY = Y^T Y, Re G = XX + YY,
 * Im G = (X - Y)^T (X + Y) - XX + YY), and serves both the real and the imaginary part of w_g: half
 * the operations of the direct product Psi^dagger (D Psi). Tile by tile of the upper triangle, every
 * group's products are summed into A = sum Re(w_g) G_g and B = sum Im(w_g) G_g while in cache, then
 * u = A + i B goes to out. Returns out.
 */
export function simdGramSum(n: number, m: number, psi: Float64Array, order: Int32Array, starts: number[], wr: number[], wi: number[], out: Float64Array): Float64Array {
  const T = GRAM_TILE, tile = T * T;
  // The parts X, Y, X - Y, X + Y of the rows of Psi in group order (group g: rows starts[g] ..
  // starts[g + 1]), each stored as panels of 4 columns (entry (k, a) at (a / 4) 4n + 4k + a % 4):
  // a group's rows are then a panel block that the kernel reads both as B and, transposed, as A,
  // with nothing to pack. Then a tile's three products and four sums (real and imaginary parts
  // of A and B).
  const mp = (m + 3) & ~3, plane = mp * n;
  const [xp, yp, dp, sp] = [0, 1, 2, 3].map((t) => 8 * t * plane);
  const productsAt = 32 * plane, sumsAt = productsAt + 24 * tile;
  const { kernels, memory } = realspaceWorkspace(sumsAt + 32 * tile);
  const view = (byte: number, length: number) => new Float64Array(memory, byte, length);
  const [x, y, d, t] = [xp, yp, dp, sp].map((at) => view(at, plane));
  for (let k = 0; k < n; k++) {
    const from = 2 * order[k] * m;
    for (let a = 0; a < mp; a++) {
      const o = (a >> 2) * 4 * n + 4 * k + (a & 3);
      const re = a < m ? psi[from + 2 * a] : 0, im = a < m ? psi[from + 2 * a + 1] : 0;
      x[o] = re;
      y[o] = im;
      d[o] = re - im;
      t[o] = re + im;
    }
  }
  const products = view(productsAt, 3 * tile), sums = view(sumsAt, 4 * tile);
  products.fill(0);
  const [are, aim, bre, bim] = [0, 1, 2, 3].map((s) => sums.subarray(s * tile, (s + 1) * tile));
  // The three products' A and B operands.
  const operands: [number, number][] = [[xp, xp], [yp, yp], [dp, sp]];
  for (let j0 = 0; j0 < m; j0 += T) {
    const cols = Math.min(T, m - j0), padded = (cols + 3) & ~3;
    for (let i0 = 0; i0 <= j0; i0 += T) {
      const rows = Math.min(T, m - i0);
      sums.fill(0);
      for (let g = 0; g + 1 < starts.length; g++) {
        const from = starts[g], depth = starts[g + 1] - from;
        operands.forEach(([aAt, bAt], p) => {
          kernels.realProduct(aAt + 8 * (i0 * n + 4 * from), 8, bAt + 8 * (j0 * n + 4 * from), 32, productsAt + 8 * p * tile, 8 * T, rows, depth, padded, 32 * n, 32 * n, 32);
        });
        kernels.gramCombine(productsAt, productsAt + 8 * tile, productsAt + 16 * tile, sumsAt, sumsAt + 8 * tile, sumsAt + 16 * tile, sumsAt + 24 * tile, 8 * rows * T, wr[g], wi[g]);
      }
      // u_ij = A_ij + i B_ij above the diagonal, u_ji = conj(A_ij) + i conj(B_ij) below it, the
      // diagonal from the real parts alone (A and B are Hermitian).
      for (let i = i0; i < i0 + rows; i++) {
        for (let j = Math.max(j0, i); j < j0 + cols; j++) {
          const o = (i - i0) * T + j - j0;
          if (i === j) {
            out[2 * (i * m + i)] = are[o];
            out[2 * (i * m + i) + 1] = bre[o];
            continue;
          }
          out[2 * (i * m + j)] = are[o] - bim[o];
          out[2 * (i * m + j) + 1] = aim[o] + bre[o];
          out[2 * (j * m + i)] = are[o] + bim[o];
          out[2 * (j * m + i) + 1] = bre[o] - aim[o];
        }
      }
    }
  }
  return out;
}

/** Products of at least this many complex multiply-adds take the three real products. */
const THREE_REAL = 1 << 18;

/** Tile of the blocked transposes (keeps both sides' lines in cache). */
const TILE = 32;

/** out (cols x rows) = a^dagger for a (rows x cols), complex interleaved row-major. */
export function adjointInto(rows: number, cols: number, a: Float64Array, out: Float64Array): void {
  for (let i0 = 0; i0 < rows; i0 += TILE) {
    const i1 = Math.min(rows, i0 + TILE);
    for (let j0 = 0; j0 < cols; j0 += TILE) {
      const j1 = Math.min(cols, j0 + TILE);
      for (let i = i0; i < i1; i++) {
        for (let j = j0; j < j1; j++) {
          out[2 * (j * rows + i)] = a[2 * (i * cols + j)];
          out[2 * (j * rows + i) + 1] = -a[2 * (i * cols + j) + 1];
        }
      }
    }
  }
}
