// A minimal WebAssembly binary writer: one memory imported as env.memory, functions with i32
// parameters and no results, and the few instructions the dense block kernels need
// (WebAssembly core specification 2.0, binary format, and its fixed-width SIMD proposal).

/** Value types of the binary format. */
export const I32 = 0x7f;
export const F64 = 0x7c;
export const V128 = 0x7b;

/** Unsigned LEB128. */
function uleb(out: number[], v: number): void {
  do {
    let b = v & 0x7f;
    v >>>= 7;
    if (v !== 0) b |= 0x80;
    out.push(b);
  } while (v !== 0);
}

/** Signed LEB128 (32-bit values). */
function sleb(out: number[], v: number): void {
  for (;;) {
    const b = v & 0x7f;
    v >>= 7;
    if ((v === 0 && (b & 0x40) === 0) || (v === -1 && (b & 0x40) !== 0)) { out.push(b); return; }
    out.push(b | 0x80);
  }
}

/** The body of one function: locals are declared by type and addressed by index (parameters first). */
export class FunctionBody {
  readonly code: number[] = [];
  private readonly locals: number[] = [];

  constructor(readonly params: number) {}

  /** A new local of the given type; returns its index. */
  local(type: number): number {
    this.locals.push(type);
    return this.params + this.locals.length - 1;
  }

  get(i: number): this { this.code.push(0x20); uleb(this.code, i); return this; }
  set(i: number): this { this.code.push(0x21); uleb(this.code, i); return this; }
  i32(v: number): this { this.code.push(0x41); sleb(this.code, v); return this; }
  /** A plain opcode (arithmetic, comparisons, end). */
  op(...bytes: number[]): this { this.code.push(...bytes); return this; }
  /** A SIMD instruction (prefix 0xfd, then its number). */
  simd(n: number): this { this.code.push(0xfd); uleb(this.code, n); return this; }
  /** Memory access: opcode, then alignment exponent and constant offset. */
  mem(opcode: number, align: number, offset = 0): this { this.code.push(opcode); uleb(this.code, align); uleb(this.code, offset); return this; }
  simdMem(n: number, align: number, offset = 0): this { this.simd(n); uleb(this.code, align); uleb(this.code, offset); return this; }

  /** `block; loop; <test>; br_if exit; <body>; br loop; end; end` — a while loop whose test leaves 1 to leave. */
  whileNot(exitTest: () => void, body: () => void): this {
    this.code.push(0x02, 0x40, 0x03, 0x40);
    exitTest();
    this.code.push(0x0d, 1);
    body();
    this.code.push(0x0c, 0, 0x0b, 0x0b);
    return this;
  }

  /** `if <then> end` on the i32 on the stack. */
  when(then: () => void): this {
    this.code.push(0x04, 0x40);
    then();
    this.code.push(0x0b);
    return this;
  }

  /** Locals declaration followed by the code and the closing end, as the code section wants it. */
  bytes(): number[] {
    const out: number[] = [];
    const runs: [number, number][] = [];
    for (const t of this.locals) {
      if (runs.length > 0 && runs[runs.length - 1][1] === t) runs[runs.length - 1][0]++;
      else runs.push([1, t]);
    }
    uleb(out, runs.length);
    for (const [count, t] of runs) { uleb(out, count); out.push(t); }
    out.push(...this.code, 0x0b);
    return out;
  }
}

function section(out: number[], id: number, content: number[]): void {
  out.push(id);
  uleb(out, content.length);
  out.push(...content);
}

function name(out: number[], s: string): void {
  const b = new TextEncoder().encode(s);
  uleb(out, b.length);
  out.push(...b);
}

/** A module importing env.memory and exporting each function under its name (all parameters i32, no results). */
export function moduleBytes(fns: { name: string; body: FunctionBody }[]): Uint8Array {
  const out = [0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00];
  const types: number[] = [];
  uleb(types, fns.length);
  for (const f of fns) {
    types.push(0x60);
    uleb(types, f.body.params);
    for (let i = 0; i < f.body.params; i++) types.push(I32);
    types.push(0);
  }
  section(out, 1, types);
  const imports: number[] = [1];
  name(imports, 'env');
  name(imports, 'memory');
  imports.push(0x02, 0x00, 0x00); // memory, limits: minimum 0 pages, no maximum
  section(out, 2, imports);
  const funcs: number[] = [];
  uleb(funcs, fns.length);
  fns.forEach((_, i) => uleb(funcs, i));
  section(out, 3, funcs);
  const exports: number[] = [];
  uleb(exports, fns.length);
  fns.forEach((f, i) => { name(exports, f.name); exports.push(0x00); uleb(exports, i); });
  section(out, 7, exports);
  const code: number[] = [];
  uleb(code, fns.length);
  for (const f of fns) {
    const b = f.body.bytes();
    uleb(code, b.length);
    code.push(...b);
  }
  section(out, 10, code);
  return Uint8Array.from(out);
}
