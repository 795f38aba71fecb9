/**
 * The eigensolver's hot complex loops as WebAssembly SIMD (f64x2: one complex number per vector
 * register), about twice the throughput of scalar JavaScript on them.
 *
 * The module is assembled here, byte by byte, by a small emitter: the engine stays one set of
 * TypeScript sources (no toolchain, no .wasm file to load, no async start-up), and the module is
 * small enough (3.2 kB, and 1.3 kB for a second module on the same memory; browsers compile up to
 * 4 kB synchronously even on a page's main thread) to compile synchronously anywhere: Node, a
 * browser Web Worker, a cluster shard. Only baseline
 * SIMD128 is used (no relaxed SIMD, which Node 20 lacks).
 *
 * Memory: every module of the engine (the eigensolver's here, the eigenphases', the real-space
 * kernels') shares one memory (calls are synchronous, so a user's data lives there only during one
 * of its own calls). A request for more than the memory holds makes a larger memory, on which each
 * module is instantiated anew when next used; earlier users keep theirs (a memory is never grown:
 * that would detach the buffer under their views, so its maximum is its initial size). One memory,
 * not one per module: a host reserves address space for each (about 10 GB on 64-bit V8), and the
 * kernel bounds a cell's address space. Complex arrays are interleaved (re, im) and 16-byte
 * aligned; every address passed to a kernel is a byte offset.
 */

/** The few WebAssembly declarations used here (the engine is compiled without DOM or Node types). */
export interface WasmMemory {
  readonly buffer: ArrayBuffer;
}
export interface WasmApi {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { readonly exports: Record<string, unknown> };
  Memory: new (descriptor: { initial: number; maximum?: number }) => WasmMemory;
}

/** Kernels of the general eigenvalue problem (eigphases.ts), a module of their own (see below). */
export interface EigenphaseKernels {
  /** A QR sweep's row rotation of two rows (see rotatePair below). */
  rotatePair(x: number, y: number, len: number, c: number, sr: number, si: number): void;
  /** A QR sweep's column rotations, several at once, row by row (see rotateRows below). */
  rotateRows(a: number, stride: number, rows: number, rot: number, steps: number): void;
  /** s = u^dagger A over an m x m block (see columnDots below). */
  columnDots(a: number, stride: number, u: number, s: number, m: number): void;
  /** A <- P A P from s = u^dagger A, on indices k1.. of an n x n matrix (see similarityRows below). */
  similarityRows(a: number, stride: number, u: number, s: number, n: number, k1: number, beta: number): void;
  /** similarityRows, and next_j = sum_{i > k1} conj(A'_{i,k1}) A'_ij (j > k1) in the same pass. */
  similarityDots(a: number, stride: number, u: number, s: number, n: number, k1: number, beta: number, next: number): void;
}

/** Kernels (see their generators below for what each computes). */
export interface SimdKernels {
  /** Vectors y_c (count of them, stride bytes apart, len complex entries) times P_v P_u. */
  reflectPair(u: number, v: number, y: number, len: number, count: number, stride: number, betaU: number, betaV: number): void;
  /** p = B w over an m x m Hermitian block B stored in its upper triangle (rows stride bytes apart). */
  hermitianTimes(b: number, stride: number, w: number, p: number, m: number): void;
  /** Real C = A B, row-major and contiguous: A m x k, B k x cols, C m x cols; cols a multiple of 4. */
  realProduct(a: number, b: number, c: number, m: number, k: number, cols: number): void;
  /** Rows from..to-1 of B -= u q^dagger + q u^dagger, q prepared (see rank2Rows below). */
  rank2Update(b: number, stride: number, u: number, q: number, from: number, to: number, m: number): void;
  /** rank2Update, and p = B' w (indices 1..m-1) from the updated rows in the same pass. */
  rank2Times(b: number, stride: number, u: number, q: number, from: number, to: number, m: number, w: number, p: number): void;
}

// --- the emitter -------------------------------------------------------------------------------

export const I32 = 0x7f;
export const F64 = 0x7c;
export const V128 = 0x7b;

function uleb(x: number): number[] {
  const out: number[] = [];
  do {
    let byte = x & 0x7f;
    x >>>= 7;
    if (x !== 0) byte |= 0x80;
    out.push(byte);
  } while (x !== 0);
  return out;
}

function sleb(x: number): number[] {
  const out: number[] = [];
  for (;;) {
    const byte = x & 0x7f;
    x >>= 7;
    if ((x === 0 && (byte & 0x40) === 0) || (x === -1 && (byte & 0x40) !== 0)) {
      out.push(byte);
      return out;
    }
    out.push(byte | 0x80);
  }
}

/** The 8 bytes of x, little-endian (WebAssembly's byte order, whatever the platform's). */
function f64Bytes(...xs: number[]): number[] {
  const view = new DataView(new ArrayBuffer(8 * xs.length));
  xs.forEach((x, i) => view.setFloat64(8 * i, x, true));
  return Array.from(new Uint8Array(view.buffer));
}

/** Swap the two f64 lanes: (a, b) -> (b, a). */
const SWAP = [8, 9, 10, 11, 12, 13, 14, 15, 0, 1, 2, 3, 4, 5, 6, 7];

/** One function body: typed locals and a byte stream of instructions, with a few composite helpers. */
export class Body {
  readonly code: number[] = [];
  private readonly locals: number[] = [];

  constructor(readonly params: number[]) {}

  local(type: number): number {
    this.locals.push(type);
    return this.params.length + this.locals.length - 1;
  }

  get(i: number): this {
    this.code.push(0x20, ...uleb(i));
    return this;
  }
  set(i: number): this {
    this.code.push(0x21, ...uleb(i));
    return this;
  }
  i32(x: number): this {
    this.code.push(0x41, ...sleb(x));
    return this;
  }
  f64(x: number): this {
    this.code.push(0x44, ...f64Bytes(x));
    return this;
  }
  op(...bytes: number[]): this {
    this.code.push(...bytes);
    return this;
  }
  /** SIMD instruction (0xfd prefix). */
  simd(code: number, ...imm: number[]): this {
    this.code.push(0xfd, ...uleb(code), ...imm);
    return this;
  }
  // i32
  add(): this { return this.op(0x6a); }
  sub(): this { return this.op(0x6b); }
  mul(): this { return this.op(0x6c); }
  and(): this { return this.op(0x71); }
  ltU(): this { return this.op(0x49); }
  // f64 scalars
  fadd(): this { return this.op(0xa0); }
  fsub(): this { return this.op(0xa1); }
  fmul(): this { return this.op(0xa2); }
  fneg(): this { return this.op(0x9a); }
  fload(offset = 0): this { return this.op(0x2b, 3, ...uleb(offset)); }
  // v128 / f64x2
  vload(offset = 0): this { return this.simd(0x00, 4, ...uleb(offset)); }
  vstore(offset = 0): this { return this.simd(0x0b, 4, ...uleb(offset)); }
  /** The v128 local l with its lanes swapped (a shuffle of l with itself). */
  swapped(l: number): this { return this.get(l).get(l).simd(0x0d, ...SWAP); }
  splat(): this { return this.simd(0x14); }
  lane(i: number): this { return this.simd(0x21, i); }
  vadd(): this { return this.simd(0xf0); }
  vsub(): this { return this.simd(0xf1); }
  vmul(): this { return this.simd(0xf2); }
  vzero(): this { return this.simd(0x0c, ...new Array<number>(16).fill(0)); }
  /** (x, -x) from the f64 on the stack. */
  plusMinus(): this {
    this.splat();
    return this.simd(0x0c, ...f64Bytes(1, -1)).vmul();
  }

  /** acc += (stack top two v128 multiplied). */
  accumulate(acc: number): this {
    return this.vmul().get(acc).vadd().set(acc);
  }

  /** while (a < b) { body() } for the i32 locals a, b (signed), the body advancing a. */
  whileLess(a: number, b: number, body: () => void): this {
    this.op(0x02, 0x40, 0x03, 0x40); // block, loop
    this.get(a).get(b).op(0x4e).op(0x0d, 1); // a >= b (signed): leave the block
    body();
    this.op(0x0c, 0, 0x0b, 0x0b); // continue the loop; end, end
    return this;
  }

  /** if (the i32 on the stack is not 0) body() */
  when(body: () => void): this {
    this.op(0x04, 0x40);
    body();
    return this.op(0x0b);
  }

  /** if (the i32 on the stack is not 0) then() else otherwise() */
  if(then: () => void, otherwise: () => void): this {
    this.op(0x04, 0x40);
    then();
    this.op(0x05);
    otherwise();
    return this.op(0x0b);
  }

  /** while (ptr < end) { body(); ptr += step } (locals; `step` a constant, or a local as [index]). */
  forBytes(ptr: number, end: number, step: number | [number], body: () => void): this {
    this.op(0x02, 0x40); // block
    this.get(ptr).get(end).op(0x4f).op(0x0d, 0); // ptr >= end (unsigned): leave
    this.op(0x03, 0x40); // loop
    body();
    this.get(ptr);
    if (typeof step === 'number') this.i32(step);
    else this.get(step[0]);
    this.add().set(ptr);
    this.get(ptr).get(end).ltU().op(0x0d, 0);
    this.op(0x0b, 0x0b);
    return this;
  }

  bytes(): number[] {
    const groups: number[] = [];
    for (const t of this.locals) groups.push(1, t);
    const body = [...uleb(this.locals.length), ...groups, ...this.code, 0x0b];
    return [...uleb(body.length), ...body];
  }
}

function section(id: number, content: number[]): number[] {
  return [id, ...uleb(content.length), ...content];
}

function vec(items: number[][]): number[] {
  return [...uleb(items.length), ...items.flat()];
}

function name(s: string): number[] {
  return [...uleb(s.length), ...Array.from(s, (c) => c.charCodeAt(0))];
}

// --- the kernels -------------------------------------------------------------------------------

/**
 * reflectPair(u, v, y, len, count, stride, bu, bv): for each of `count` vectors y (len complex
 * entries, `stride` bytes apart), y -= a u + b v with a = bu u^dagger y, b = bv (v^dagger y -
 * a v^dagger u): y <- (I - bv v v^dagger)(I - bu u u^dagger) y, the two reflectors in one pass.
 */
function reflectPair(): Body {
  const [u, v, y, len, count, stride, bu, bv] = [0, 1, 2, 3, 4, 5, 6, 7];
  const f = new Body([I32, I32, I32, I32, I32, I32, F64, F64]);
  const j = f.local(I32);
  const jEnd = f.local(I32);
  const yEnd = f.local(I32);
  const row = f.local(I32);
  const addr = f.local(I32);
  const [cr, ci, ar, ai, br, bi] = [f.local(F64), f.local(F64), f.local(F64), f.local(F64), f.local(F64), f.local(F64)];
  const uu = f.local(V128);
  const vv = f.local(V128);
  const su = f.local(V128);
  const sv = f.local(V128);
  const ys = [f.local(V128), f.local(V128)];
  const sy = f.local(V128);
  // Per vector t: the four dot accumulators, then the four update coefficients (same registers).
  const acc = [0, 1].map(() => [f.local(V128), f.local(V128), f.local(V128), f.local(V128)]);
  // c = v^dagger u: accumulate v*u = (vr ur, vi ui) and v*swap(u) = (vr ui, vi ur).
  const [pc, qc] = acc[0];
  f.vzero().set(pc).vzero().set(qc);
  f.i32(0).set(j).get(len).i32(16).mul().set(jEnd);
  f.forBytes(j, jEnd, 16, () => {
    f.get(v).get(j).add().vload().set(vv);
    f.get(u).get(j).add().vload().set(uu);
    f.get(vv).get(uu).accumulate(pc);
    f.get(vv).swapped(uu).accumulate(qc);
  });
  f.get(pc).lane(0).get(pc).lane(1).fadd().set(cr);
  f.get(qc).lane(0).get(qc).lane(1).fsub().set(ci);
  /** The vectors at row, row + stride, ... (nv of them): dots, coefficients, update. */
  const group = (nv: number): void => {
    for (let t = 0; t < nv; t++) for (const x of acc[t]) f.vzero().set(x);
    f.i32(0).set(j);
    f.forBytes(j, jEnd, 16, () => {
      f.get(u).get(j).add().vload().set(uu);
      f.get(v).get(j).add().vload().set(vv);
      for (let t = 0; t < nv; t++) {
        const [pu, qu, pv, qv] = acc[t];
        f.get(row).get(j).add();
        if (t > 0) f.get(stride).add();
        f.vload().set(ys[t]);
        f.get(uu).get(ys[t]).accumulate(pu);
        f.get(vv).get(ys[t]).accumulate(pv);
        f.swapped(ys[t]).set(sy);
        f.get(uu).get(sy).accumulate(qu);
        f.get(vv).get(sy).accumulate(qv);
      }
    });
    for (let t = 0; t < nv; t++) {
      const [pu, qu, pv, qv] = acc[t];
      // a = bu u^dagger y; b = bv (v^dagger y - a c).
      f.get(pu).lane(0).get(pu).lane(1).fadd().get(bu).fmul().set(ar);
      f.get(qu).lane(0).get(qu).lane(1).fsub().get(bu).fmul().set(ai);
      f.get(pv).lane(0).get(pv).lane(1).fadd();
      f.get(ar).get(cr).fmul().get(ai).get(ci).fmul().fsub().fsub().get(bv).fmul().set(br);
      f.get(qv).lane(0).get(qv).lane(1).fsub();
      f.get(ar).get(ci).fmul().get(ai).get(cr).fmul().fadd().fsub().get(bv).fmul().set(bi);
      // a u = ar (ur, ui) + (-ai, ai) (ui, ur), likewise b v: coefficients into the accumulators.
      f.get(ar).splat().set(pu);
      f.get(ai).fneg().plusMinus().set(qu);
      f.get(br).splat().set(pv);
      f.get(bi).fneg().plusMinus().set(qv);
    }
    f.i32(0).set(j);
    f.forBytes(j, jEnd, 16, () => {
      f.get(u).get(j).add().vload().set(uu);
      f.get(v).get(j).add().vload().set(vv);
      f.swapped(uu).set(su);
      f.swapped(vv).set(sv);
      for (let t = 0; t < nv; t++) {
        const [a1, a2, b1, b2] = acc[t];
        f.get(row).get(j).add();
        if (t > 0) f.get(stride).add();
        f.set(addr); // kept for the store
        f.get(addr);
        f.get(addr).vload();
        f.get(a1).get(uu).vmul().vsub();
        f.get(a2).get(su).vmul().vsub();
        f.get(b1).get(vv).vmul().vsub();
        f.get(b2).get(sv).vmul().vsub();
        f.vstore();
      }
    });
  };
  // Pairs of vectors, then the odd one.
  f.get(y).set(row);
  f.get(y).get(count).i32(-2).and().get(stride).mul().add().set(yEnd);
  f.forBytes(row, yEnd, [stride], () => {
    group(2);
    f.get(row).get(stride).add().set(row);
  });
  f.get(count).i32(1).and().when(() => group(1));
  return f;
}

/**
 * hermitianTimes(b, stride, w, p, m): p = B w, B the m x m Hermitian block at b (row i at
 * b + i stride, entry j at +16 j), only its upper triangle and the real part of its diagonal read.
 */
function hermitianTimes(): Body {
  const [b, stride, w, p, m] = [0, 1, 2, 3, 4];
  const f = new Body([I32, I32, I32, I32, I32]);
  const i = f.local(I32);
  const iEnd = f.local(I32);
  const row = f.local(I32);
  const j = f.local(I32);
  const [m1, m2, wa, wb, bb, ww] = [f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128)];
  const bii = f.local(F64);
  const wi = f.local(V128);
  f.i32(0).set(i).get(m).i32(16).mul().set(iEnd);
  f.forBytes(i, iEnd, 16, () => {
    f.get(p).get(i).add().vzero().vstore();
  });
  f.i32(0).set(i);
  f.get(b).set(row);
  f.forBytes(i, iEnd, 16, () => {
    // w_i, and (wr, -wr), (wi, wi) for conj(B_ij) w_i = B_ij (wr, -wr) + swap(B_ij) (wi, wi).
    f.get(w).get(i).add().vload().set(wi);
    f.get(wi).lane(0).plusMinus().set(wa);
    f.get(wi).lane(1).splat().set(wb);
    f.get(row).get(i).add().fload().set(bii);
    f.vzero().set(m1).vzero().set(m2);
    f.get(i).i32(16).add().set(j);
    f.forBytes(j, iEnd, 16, () => {
      f.get(row).get(j).add().vload().set(bb);
      f.get(w).get(j).add().vload().set(ww);
      f.get(bb).get(ww).accumulate(m1);
      f.get(bb).swapped(ww).accumulate(m2);
      f.get(p).get(j).add(); // store address
      f.get(p).get(j).add().vload();
      f.get(bb).get(wa).vmul().vadd();
      f.swapped(bb).get(wb).vmul().vadd();
      f.vstore();
    });
    // p_i += sum_j B_ij w_j + b_ii w_i: B w lanes are (br wr, bi wi) and (br wi, bi wr).
    f.get(p).get(i).add();
    f.get(p).get(i).add().vload();
    f.get(m1).lane(0).get(m1).lane(1).fsub().splat();
    f.get(m2).lane(0).get(m2).lane(1).fadd().simd(0x22, 1);
    f.vadd();
    f.get(bii).splat().get(wi).vmul().vadd();
    f.vstore();
    f.get(row).get(stride).add().set(row);
  });
  return f;
}

/**
 * rank2Update(b, stride, u, q, from, to, m) and, with `product`, rank2Times(..., w, p): with
 * q = beta B u - (beta^2/2)(u^dagger B u) u (prepared by the caller), rows from..to-1 of the m x m
 * block B at b get B_ij -= u_i conj(q_j) + q_i conj(u_j) for j >= i: B <- P B P for the reflector
 * P = I - beta u u^dagger (upper triangle). rank2Times also forms, from each row as soon as it is updated, p = B' w over indices
 * 1..m-1 (hermitianTimes' arithmetic, in its order; w_0 and p_0 untouched): the next reflector's
 * product, in the same pass over the matrix instead of a second one.
 */
function rank2Rows(product: boolean): Body {
  const [b, stride, u, q, from, to, m, w, p] = [0, 1, 2, 3, 4, 5, 6, 7, 8];
  const f = new Body(product ? [I32, I32, I32, I32, I32, I32, I32, I32, I32] : [I32, I32, I32, I32, I32, I32, I32]);
  const i = f.local(I32), iEnd = f.local(I32), row = f.local(I32), j = f.local(I32), jEnd = f.local(I32);
  const [c1, c2, c3, c4, ui, qi, uu, qq, x] = Array.from({ length: 9 }, () => f.local(V128));
  const [wi, wa, wb, ww, m1, m2] = Array.from({ length: 6 }, () => f.local(V128));
  const bii = f.local(F64);
  /** x = B_ij - u_i conj(q_j) - q_i conj(u_j), stored back; j the local byte offset. */
  const update = (): void => {
    f.get(q).get(j).add().vload().set(qq);
    f.get(u).get(j).add().vload().set(uu);
    f.get(row).get(j).add().vload();
    f.get(qq).get(c1).vmul().vsub();
    f.swapped(qq).get(c2).vmul().vsub();
    f.get(uu).get(c3).vmul().vsub();
    f.swapped(uu).get(c4).vmul().vsub();
    f.set(x);
    f.get(row).get(j).add().get(x).vstore();
  };
  f.get(m).i32(16).mul().set(jEnd);
  if (product) {
    f.i32(16).set(j);
    f.forBytes(j, jEnd, 16, () => {
      f.get(p).get(j).add().vzero().vstore();
    });
  }
  f.get(from).i32(16).mul().set(i);
  f.get(to).i32(16).mul().set(iEnd);
  f.get(b).get(from).get(stride).mul().add().set(row);
  f.forBytes(i, iEnd, 16, () => {
    f.get(u).get(i).add().vload().set(ui);
    f.get(q).get(i).add().vload().set(qi);
    f.get(ui).lane(0).plusMinus().set(c1);
    f.get(ui).lane(1).splat().set(c2);
    f.get(qi).lane(0).plusMinus().set(c3);
    f.get(qi).lane(1).splat().set(c4);
    f.get(i).set(j);
    if (!product) {
      f.forBytes(j, jEnd, 16, update);
    } else {
      update(); // the diagonal
      f.get(x).lane(0).set(bii);
      f.get(w).get(i).add().vload().set(wi);
      f.get(wi).lane(0).plusMinus().set(wa);
      f.get(wi).lane(1).splat().set(wb);
      f.vzero().set(m1).vzero().set(m2);
      f.get(i).i32(16).add().set(j);
      f.forBytes(j, jEnd, 16, () => {
        update();
        f.get(w).get(j).add().vload().set(ww);
        f.get(x).get(ww).accumulate(m1);
        f.get(x).swapped(ww).accumulate(m2);
        f.get(p).get(j).add();
        f.get(p).get(j).add().vload();
        f.get(x).get(wa).vmul().vadd();
        f.swapped(x).get(wb).vmul().vadd();
        f.vstore();
      });
      f.get(p).get(i).add();
      f.get(p).get(i).add().vload();
      f.get(m1).lane(0).get(m1).lane(1).fsub().splat();
      f.get(m2).lane(0).get(m2).lane(1).fadd().simd(0x22, 1);
      f.vadd();
      f.get(bii).splat().get(wi).vmul().vadd();
      f.vstore();
    }
    f.get(row).get(stride).add().set(row);
  });
  return f;
}

/**
 * realProduct(a, b, c, m, k, cols): C = A B for real row-major matrices (A m x k, B k x cols,
 * C m x cols, cols a multiple of 4). Register tile: 4 rows of C by 4 columns (8 f64x2
 * accumulators); leftover rows one at a time.
 */
function realProduct(): Body {
  const [a, b, c, m, k, cols] = [0, 1, 2, 3, 4, 5];
  const f = new Body([I32, I32, I32, I32, I32, I32]);
  const rowA = f.local(I32);
  const rowC = f.local(I32);
  const row = f.local(I32);
  const rowEnd = f.local(I32);
  const col = f.local(I32);
  const colEnd = f.local(I32);
  const pa = f.local(I32);
  const paEnd = f.local(I32);
  const pb = f.local(I32);
  const x = f.local(V128);
  const b0 = f.local(V128);
  const b1 = f.local(V128);
  const acc = Array.from({ length: 8 }, () => f.local(V128));
  f.get(k).i32(8).mul().set(rowA);
  f.get(cols).i32(8).mul().set(rowC);
  f.get(rowC).set(colEnd);
  // Rows of C four at a time while four remain, then one at a time.
  const tile = (rows: number): void => {
    f.i32(0).set(col);
    f.forBytes(col, colEnd, 32, () => {
      for (let t = 0; t < 2 * rows; t++) f.vzero().set(acc[t]);
      f.get(a).get(row).get(rowA).mul().add().set(pa);
      f.get(pa).get(rowA).add().set(paEnd);
      f.get(b).get(col).add().set(pb);
      f.forBytes(pa, paEnd, 8, () => {
        f.get(pb).vload().set(b0);
        f.get(pb).vload(16).set(b1);
        for (let t = 0; t < rows; t++) {
          // A[row + t][.] is rowA bytes below A[row][.]: address pa + t rowA.
          f.get(pa);
          if (t > 0) f.get(rowA).i32(t).mul().add();
          f.fload().splat().set(x);
          f.get(x).get(b0).accumulate(acc[2 * t]);
          f.get(x).get(b1).accumulate(acc[2 * t + 1]);
        }
        f.get(pb).get(rowC).add().set(pb);
      });
      for (let t = 0; t < rows; t++) {
        f.get(c).get(row).i32(t).add().get(rowC).mul().add().get(col).add().set(pb);
        f.get(pb).get(acc[2 * t]).vstore();
        f.get(pb).get(acc[2 * t + 1]).vstore(16);
      }
    });
  };
  f.i32(0).set(row);
  f.get(m).i32(3).sub().set(rowEnd);
  f.whileLess(row, rowEnd, () => {
    tile(4);
    f.get(row).i32(4).add().set(row);
  });
  f.get(m).set(rowEnd);
  f.whileLess(row, rowEnd, () => {
    tile(1);
    f.get(row).i32(1).add().set(row);
  });
  return f;
}

/**
 * columnDots(a, stride, u, s, m): s_j = sum_i conj(u_i) A_ij over an m x m block at a (rows
 * stride bytes apart), two rows per pass over s: the left half of a Householder similarity.
 */
function columnDots(): Body {
  const [a, stride, u, s, m] = [0, 1, 2, 3, 4];
  const f = new Body([I32, I32, I32, I32, I32]);
  const i = f.local(I32), iEnd = f.local(I32), pairEnd = f.local(I32), row = f.local(I32), j = f.local(I32), jEnd = f.local(I32);
  const [c1, d1, c2, d2, x, acc] = [f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128)];
  f.i32(0).set(j).get(m).i32(16).mul().set(jEnd);
  f.forBytes(j, jEnd, 16, () => {
    f.get(s).get(j).add().vzero().vstore();
  });
  /** conj(u_i) x = ur (xr, xi) + (ui, -ui) (xi, xr): the coefficients of row `which` of the pair. */
  const coefficients = (offset: number, c: number, d: number): void => {
    f.get(u).get(i).add().fload(offset).splat().set(c);
    f.get(u).get(i).add().fload(offset + 8).plusMinus().set(d);
  };
  f.i32(0).set(i).get(m).i32(16).mul().set(iEnd);
  f.get(iEnd).i32(-32).and().set(pairEnd);
  f.get(a).set(row);
  f.forBytes(i, pairEnd, 32, () => {
    coefficients(0, c1, d1);
    coefficients(16, c2, d2);
    f.i32(0).set(j);
    f.forBytes(j, jEnd, 16, () => {
      f.get(s).get(j).add().vload().set(acc);
      f.get(row).get(j).add().vload().set(x);
      f.get(c1).get(x).accumulate(acc);
      f.get(d1).swapped(x).accumulate(acc);
      f.get(row).get(stride).add().get(j).add().vload().set(x);
      f.get(c2).get(x).accumulate(acc);
      f.get(d2).swapped(x).accumulate(acc);
      f.get(s).get(j).add().get(acc).vstore();
    });
    f.get(row).get(stride).i32(2).mul().add().set(row);
  });
  f.get(i).get(iEnd).ltU().when(() => {
    coefficients(0, c1, d1);
    f.i32(0).set(j);
    f.forBytes(j, jEnd, 16, () => {
      f.get(s).get(j).add().vload().set(acc);
      f.get(row).get(j).add().vload().set(x);
      f.get(c1).get(x).accumulate(acc);
      f.get(d1).swapped(x).accumulate(acc);
      f.get(s).get(j).add().get(acc).vstore();
    });
  });
  return f;
}

/**
 * similarityRows(a, stride, u, s, n, k1, beta): A <- P A P for P = I - beta u u^dagger acting on
 * indices k1.. (u stored at those indices), given s = u^dagger A (columnDots), row by row, each row
 * once: rows i >= k1 first get A_ij -= beta u_i s_j, then every row gets A_ij -= t conj(u_j) with
 * t = beta sum_j A_ij u_j; columns j >= k1 only. Two sweeps of the row, not four: the left update
 * and the dot for t share one, the right update and the next reflector's dots the other; and two
 * rows at a time, sharing the loads of s_j, u_j and next_j. The loads and stores, not the
 * arithmetic, bound these sweeps (from L1 cache): the Hessenberg reduction at n = 900 went from
 * 0.84 s (four sweeps, one row) to 0.70 s (two sweeps) to 0.60 s (two rows), with the same numbers
 * (the same operations in the same order).
 */
function similarityRows(dots: boolean): Body {
  const [a, stride, u, s, n, k1, beta, next] = [0, 1, 2, 3, 4, 5, 6, 7];
  const f = new Body(dots ? [I32, I32, I32, I32, I32, I32, F64, I32] : [I32, I32, I32, I32, I32, I32, F64]);
  const i = f.local(I32), end = f.local(I32), pairEnd = f.local(I32), leftFrom = f.local(I32);
  const row = f.local(I32), row2 = f.local(I32), j = f.local(I32), jEnd = f.local(I32), j0 = f.local(I32);
  const rows = [0, 1].map(() => ({ c: f.local(V128), d: f.local(V128), m1: f.local(V128), m2: f.local(V128), cx: f.local(V128), dx: f.local(V128), x: f.local(V128) }));
  const [uu, su, acc] = [f.local(V128), f.local(V128), f.local(V128)];
  const [tr, ti, ur, ui] = [f.local(F64), f.local(F64), f.local(F64), f.local(F64)];
  const rowAt = [row, row2];
  f.get(k1).i32(16).mul().set(j0);
  f.get(n).i32(16).mul().set(jEnd);
  f.get(k1).i32(16).mul().set(leftFrom);
  if (dots) {
    // next_j = 0 for j > k1
    f.get(j0).i32(16).add().set(j);
    f.forBytes(j, jEnd, 16, () => {
      f.get(next).get(j).add().vzero().vstore();
    });
  }
  /** uu = u_j and su = uu with its lanes swapped. */
  const loadU = (): void => {
    f.get(u).get(j).add().vload().set(uu);
    f.swapped(uu).set(su);
  };
  /** x = row entry j - t conj(u_j) = - (tr, -tr) u - (ti, ti) swap(u), stored back (loadU first). */
  const right = (r: number): void => {
    const { c, d, x } = rows[r];
    f.get(rowAt[r]).get(j).add().vload();
    f.get(c).get(uu).vmul().vsub();
    f.get(d).get(su).vmul().vsub();
    f.set(x);
    f.get(rowAt[r]).get(j).add().get(x).vstore();
  };
  /** Row i (at row) and, with count 2, row i + 1 (at row2); the left update for rows from k1 on, the next dots for rows after k1. */
  const body = (count: number, left: boolean, nextDots: boolean): void => {
    const each = (g: (r: number) => void): void => {
      for (let r = 0; r < count; r++) g(r);
    };
    f.get(row).get(stride).add().set(row2);
    each((r) => f.vzero().set(rows[r].m1).vzero().set(rows[r].m2));
    f.get(j0).set(j);
    if (left) {
      // c = beta u_i: x = row - (cr, cr) s - (-ci, ci) swap(s), stored, and into the dot.
      each((r) => {
        f.get(u).get(i).add().fload(16 * r).get(beta).fmul().set(ur);
        f.get(u).get(i).add().fload(16 * r + 8).get(beta).fmul().set(ui);
        f.get(ur).splat().set(rows[r].c);
        f.get(ui).fneg().plusMinus().set(rows[r].d);
      });
      f.forBytes(j, jEnd, 16, () => {
        f.get(s).get(j).add().vload().set(acc);
        f.swapped(acc).set(su);
        each((r) => {
          const { c, d, x } = rows[r];
          f.get(rowAt[r]).get(j).add().vload();
          f.get(c).get(acc).vmul().vsub();
          f.get(d).get(su).vmul().vsub();
          f.set(x);
          f.get(rowAt[r]).get(j).add().get(x).vstore();
        });
        loadU();
        each((r) => {
          f.get(rows[r].x).get(uu).accumulate(rows[r].m1);
          f.get(rows[r].x).get(su).accumulate(rows[r].m2);
        });
      });
    } else {
      f.forBytes(j, jEnd, 16, () => {
        loadU();
        each((r) => {
          f.get(rowAt[r]).get(j).add().vload().set(rows[r].x);
          f.get(rows[r].x).get(uu).accumulate(rows[r].m1);
          f.get(rows[r].x).get(su).accumulate(rows[r].m2);
        });
      });
    }
    // t = beta sum_j A_ij u_j from the lanes (xr ur, xi ui) and (xr ui, xi ur); c, d: -t conj(u).
    each((r) => {
      const { c, d, m1, m2 } = rows[r];
      f.get(m1).lane(0).get(m1).lane(1).fsub().get(beta).fmul().set(tr);
      f.get(m2).lane(0).get(m2).lane(1).fadd().get(beta).fmul().set(ti);
      f.get(tr).plusMinus().set(c);
      f.get(ti).splat().set(d);
    });
    f.get(j0).set(j);
    if (nextDots) {
      // next_j += conj(x_i) A_ij (j > k1), x_i = A_{i,k1} once updated (the sweep's first entry):
      // conj(x) y = (xr, xr) y + (xi, -xi) swap(y).
      loadU();
      each((r) => {
        right(r);
        f.get(rows[r].x).lane(0).splat().set(rows[r].cx);
        f.get(rows[r].x).lane(1).plusMinus().set(rows[r].dx);
      });
      f.get(j0).i32(16).add().set(j);
      f.forBytes(j, jEnd, 16, () => {
        loadU();
        each(right);
        f.get(next).get(j).add().vload().set(acc);
        each((r) => {
          const { cx, dx, x } = rows[r];
          f.get(cx).get(x).accumulate(acc);
          f.get(dx).swapped(x).accumulate(acc);
        });
        f.get(next).get(j).add().get(acc).vstore();
      });
    } else {
      f.forBytes(j, jEnd, 16, () => {
        loadU();
        each(right);
      });
    }
  };
  /** Rows from i up to `end` (bytes): two at a time, then the last one if left over. */
  const segment = (left: boolean, nextDots: boolean): void => {
    f.get(end).i32(16).sub().set(pairEnd);
    f.whileLess(i, pairEnd, () => {
      body(2, left, nextDots);
      f.get(i).i32(32).add().set(i);
      f.get(row2).get(stride).add().set(row);
    });
    f.get(i).get(end).op(0x48).when(() => {
      body(1, left, nextDots);
      f.get(i).i32(16).add().set(i);
      f.get(row).get(stride).add().set(row);
    });
  };
  f.i32(0).set(i);
  f.get(a).set(row);
  // Rows above k1 (right update only), row k1 (both updates), the rows below (and the next dots).
  f.get(leftFrom).set(end);
  segment(false, false);
  f.get(leftFrom).i32(16).add().set(end);
  segment(true, false);
  f.get(n).i32(16).mul().set(end);
  segment(true, dots);
  return f;
}

/**
 * rotatePair(x, y, len, c, sr, si): rows x, y (len complex entries) of a QR sweep's row rotation,
 * x <- c x + s y, y <- c y - conj(s) x, s = sr + i si.
 */
function rotatePair(): Body {
  const [x, y, len, c, sr, si] = [0, 1, 2, 3, 4, 5];
  const f = new Body([I32, I32, I32, F64, F64, F64]);
  const j = f.local(I32), jEnd = f.local(I32);
  const [cv, sv, pv, xv, yv] = [f.local(V128), f.local(V128), f.local(V128), f.local(V128), f.local(V128)];
  f.get(c).splat().set(cv);
  f.get(sr).splat().set(sv);
  f.get(si).plusMinus().set(pv); // (si, -si)
  f.i32(0).set(j).get(len).i32(16).mul().set(jEnd);
  f.forBytes(j, jEnd, 16, () => {
    f.get(x).get(j).add().vload().set(xv);
    f.get(y).get(j).add().vload().set(yv);
    f.get(x).get(j).add();
    f.get(cv).get(xv).vmul().get(sv).get(yv).vmul().vadd().get(pv).swapped(yv).vmul().vsub();
    f.vstore();
    f.get(y).get(j).add();
    f.get(cv).get(yv).vmul().get(sv).get(xv).vmul().vsub().get(pv).swapped(xv).vmul().vsub();
    f.vstore();
  });
  return f;
}

/**
 * rotateRows(a, stride, rows, rot, steps): in each of `rows` rows (stride bytes apart, from a),
 * the column rotations of `steps` consecutive column pairs in order: entries x, y of pair t become
 * c x + conj(s) y and c y - s x. Rotation t is stored at rot + 48 t as (c, c), (sr, sr), (si, -si).
 */
function rotateRows(): Body {
  const [a, stride, rows, rot, steps] = [0, 1, 2, 3, 4];
  const f = new Body([I32, I32, I32, I32, I32]);
  const row = f.local(I32), rowEnd = f.local(I32), pairEnd = f.local(I32), p = f.local(I32), t = f.local(I32), tEnd = f.local(I32);
  const [cv, sv, pv] = [f.local(V128), f.local(V128), f.local(V128)];
  const xv = [f.local(V128), f.local(V128)], yv = [f.local(V128), f.local(V128)];
  f.get(a).set(row);
  f.get(a).get(rows).get(stride).mul().add().set(rowEnd);
  f.get(a).get(rows).i32(-2).and().get(stride).mul().add().set(pairEnd);
  f.get(rot).get(steps).i32(48).mul().add().set(tEnd);
  /** The address on the stack moved to row r of the pair (the second one stride bytes below). */
  const inRow = (r: number): void => {
    if (r > 0) f.get(stride).add();
  };
  /** `count` rows from `row`: independent chains of rotations, run side by side. */
  const rowsAt = (count: number): void => {
    f.get(row).set(p);
    for (let r = 0; r < count; r++) {
      f.get(p);
      inRow(r);
      f.vload().set(xv[r]);
    }
    f.get(rot).set(t);
    f.forBytes(t, tEnd, 48, () => {
      f.get(t).vload().set(cv);
      f.get(t).vload(16).set(sv);
      f.get(t).vload(32).set(pv);
      for (let r = 0; r < count; r++) {
        f.get(p);
        inRow(r);
        f.vload(16).set(yv[r]);
        f.get(p);
        inRow(r);
        f.get(cv).get(xv[r]).vmul().get(sv).get(yv[r]).vmul().vadd().get(pv).swapped(yv[r]).vmul().vadd();
        f.vstore();
        f.get(cv).get(yv[r]).vmul().get(sv).get(xv[r]).vmul().vsub().get(pv).swapped(xv[r]).vmul().vadd().set(xv[r]);
      }
      f.get(p).i32(16).add().set(p);
    });
    for (let r = 0; r < count; r++) {
      f.get(p);
      inRow(r);
      f.get(xv[r]).vstore();
    }
  };
  f.forBytes(row, pairEnd, [stride], () => {
    rowsAt(2);
    f.get(row).get(stride).add().set(row);
  });
  f.get(row).get(rowEnd).ltU().when(() => rowsAt(1));
  return f;
}

function moduleBytes(): Uint8Array {
  return assemble([
    ['reflectPair', reflectPair()],
    ['hermitianTimes', hermitianTimes()],
    ['realProduct', realProduct()],
  ]);
}

/** The reduction's rank-2 kernels: a second module on the same memory, to keep each small. */
function rank2ModuleBytes(): Uint8Array {
  return assemble([
    ['rank2Update', rank2Rows(false)],
    ['rank2Times', rank2Rows(true)],
  ]);
}

/** A module of the named functions, each exported, all sharing one imported memory (m.memory). */
export function assemble(kernels: [string, Body][]): Uint8Array {
  const types = kernels.map(([, f]) => [0x60, ...vec(f.params.map((t) => [t])), 0]);
  const bytes = [
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
    ...section(1, vec(types)),
    ...section(2, vec([[...name('m'), ...name('memory'), 0x02, 0x00, 0x01]])),
    ...section(3, vec(kernels.map((_, i) => uleb(i)))),
    ...section(7, vec(kernels.map(([n], i) => [...name(n), 0x00, ...uleb(i)]))),
    ...section(10, vec(kernels.map(([, f]) => f.bytes()))),
  ];
  return Uint8Array.from(bytes);
}

export const wasm = (globalThis as unknown as { WebAssembly: WasmApi }).WebAssembly;
const PAGE = 65536;
/** WebAssembly's 32-bit memory holds at most 65536 pages (4 GB). */
const MAX_PAGES = 65536;

/**
 * A shared workspace of the kernels of one or more modules (see the module comment above):
 * `get(bytes)` returns the kernels and a memory of at least `bytes` bytes, shared with other users
 * and by the modules' instances. Keep both: a later, larger request may move the others on to a
 * new instance. The modules are compiled on first use.
 */
export function workspaces<K>(...modules: (() => Uint8Array)[]): (bytes: number) => { kernels: K; memory: ArrayBuffer } {
  let compiled: object[] | null = null;
  let current: { kernels: K; memory: ArrayBuffer; on: WasmMemory } | null = null;
  return (bytes) => {
    const memory = sharedMemory(bytes);
    if (current !== null && current.on === memory) return current;
    compiled ??= modules.map((bytesOf) => new wasm.Module(bytesOf()));
    const kernels = Object.assign({}, ...compiled.map((module) => new wasm.Instance(module, { m: { memory } }).exports)) as K;
    current = { kernels, memory: memory.buffer, on: memory };
    return current;
  };
}

/** The one memory every module uses (see the module comment), replaced by a larger one when asked for more. */
let shared: WasmMemory | null = null;

function sharedMemory(bytes: number): WasmMemory {
  if (shared !== null && shared.buffer.byteLength >= bytes) return shared;
  // At least double, so that a run of growing sizes makes few memories.
  const needed = Math.ceil(bytes / PAGE);
  const pages = Math.max(needed, Math.min(MAX_PAGES, 2 * ((shared?.buffer.byteLength ?? 0) / PAGE)));
  try {
    if (needed > MAX_PAGES) throw new RangeError('too large');
    shared = new wasm.Memory({ initial: pages, maximum: pages });
  } catch {
    throw new RangeError(`linalg: could not allocate ${Math.ceil(bytes / 2 ** 20)} MB of workspace (WebAssembly memory holds at most 4096 MB). Value: ${bytes} bytes`);
  }
  return shared;
}

/** The eigensolver's kernels and a memory of at least `bytes` bytes (see `workspaces`). */
export const simdWorkspace = workspaces<SimdKernels>(moduleBytes, rank2ModuleBytes);

/** The general eigenvalue problem's kernels (a module apart to keep each small). */
export const eigenphaseWorkspace = workspaces<EigenphaseKernels>(() => assemble([
  ['columnDots', columnDots()],
  ['similarityRows', similarityRows(false)],
  ['similarityDots', similarityRows(true)],
  ['rotatePair', rotatePair()],
  ['rotateRows', rotateRows()],
]));
