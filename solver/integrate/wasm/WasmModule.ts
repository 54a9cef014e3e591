/**
 * A minimal WebAssembly binary writer (WebAssembly Core Specification 2.0,
 * §5 "Binary Format"): function types, imported functions and memory,
 * functions with locals, exports. Placode writes its time-stepping kernels
 * with it at run time from the checked formula trees, so the kernels are
 * built from the project's own sources, with no compiler or binary to install.
 */

/** Value types (§5.3.1). */
export const I32 = 0x7f, F64 = 0x7c, V128 = 0x7b;
export type ValueType = typeof I32 | typeof F64 | typeof V128;

/** Unsigned LEB128. */
export function leb(n: number): number[] {
  const out: number[] = [];
  do {
    let b = n & 0x7f;
    n >>>= 7;
    if (n) b |= 0x80;
    out.push(b);
  } while (n);
  return out;
}

/** Signed LEB128 (32-bit). */
export function sleb(n: number): number[] {
  const out: number[] = [];
  n |= 0;
  for (;;) {
    const b = n & 0x7f;
    n >>= 7;
    if ((n === 0 && (b & 0x40) === 0) || (n === -1 && (b & 0x40) !== 0)) {
      out.push(b);
      return out;
    }
    out.push(b | 0x80);
  }
}

const vector = (items: number[][]) => [...leb(items.length), ...items.flat()];
const name = (s: string) => [...leb(s.length), ...new TextEncoder().encode(s)];
const section = (id: number, body: number[]) => (body.length ? [id, ...leb(body.length), ...body] : []);
const f64Bytes = (x: number) => Array.from(new Uint8Array(new Float64Array([x]).buffer));

/**
 * The instructions of one function, written in order (§5.4), with helpers for
 * the handful of instructions the kernels use. Locals are numbered after the
 * parameters.
 */
export class FunctionBuilder {
  readonly code: number[] = [];
  private readonly localTypes: ValueType[] = [];

  constructor(readonly params: readonly ValueType[], readonly results: readonly ValueType[]) {}

  /** A new local of this type; its index. */
  local(type: ValueType): number {
    this.localTypes.push(type);
    return this.params.length + this.localTypes.length - 1;
  }

  get(i: number): this { this.code.push(0x20, ...leb(i)); return this; }
  set(i: number): this { this.code.push(0x21, ...leb(i)); return this; }
  tee(i: number): this { this.code.push(0x22, ...leb(i)); return this; }
  i32(c: number): this { this.code.push(0x41, ...sleb(c)); return this; }
  f64(c: number): this { this.code.push(0x44, ...f64Bytes(c)); return this; }
  /** raw opcodes */
  op(...bytes: number[]): this { this.code.push(...bytes); return this; }
  /** f64.load with a constant byte offset (alignment 8) */
  loadF64(offset = 0): this { this.code.push(0x2b, 3, ...leb(offset)); return this; }
  storeF64(offset = 0): this { this.code.push(0x39, 3, ...leb(offset)); return this; }
  loadI32(offset = 0): this { this.code.push(0x28, 2, ...leb(offset)); return this; }
  storeI32(offset = 0): this { this.code.push(0x36, 2, ...leb(offset)); return this; }
  /** v128 load and store (16 bytes; alignment hint 8, as pairs of f64 are) */
  loadV128(offset = 0): this { this.code.push(0xfd, ...leb(0x00), 3, ...leb(offset)); return this; }
  storeV128(offset = 0): this { this.code.push(0xfd, ...leb(0x0b), 3, ...leb(offset)); return this; }
  /** a SIMD instruction by its opcode (after the 0xfd prefix), with lane immediates */
  simd(opcode: number, ...lanes: number[]): this { this.code.push(0xfd, ...leb(opcode), ...lanes); return this; }
  call(index: number): this { this.code.push(0x10, ...leb(index)); return this; }
  block(): this { this.code.push(0x02, 0x40); return this; }
  loop(): this { this.code.push(0x03, 0x40); return this; }
  end(): this { this.code.push(0x0b); return this; }
  br(depth: number): this { this.code.push(0x0c, ...leb(depth)); return this; }
  brIf(depth: number): this { this.code.push(0x0d, ...leb(depth)); return this; }

  /** The function body: locals (grouped by runs of one type) and code. */
  encode(): number[] {
    const groups: number[][] = [];
    for (let k = 0; k < this.localTypes.length; ) {
      let j = k;
      while (j < this.localTypes.length && this.localTypes[j] === this.localTypes[k]) j++;
      groups.push([...leb(j - k), this.localTypes[k]]);
      k = j;
    }
    const body = [...vector(groups), ...this.code, 0x0b];
    return [...leb(body.length), ...body];
  }
}

/** Opcodes the kernels use (§5.4.7 numeric, §5.4.8 vector). */
export const Op = {
  i32Add: 0x6a, i32Sub: 0x6b, i32Mul: 0x6c, i32Shl: 0x74, i32Or: 0x72, i32And: 0x71, i32Eqz: 0x45, i32GeS: 0x4e, i32LtS: 0x48, i32LeS: 0x4c,
  f64Eq: 0x61, f64Ne: 0x62, f64Lt: 0x63, f64Gt: 0x64, f64Le: 0x65, f64Ge: 0x66,
  f64Abs: 0x99, f64Neg: 0x9a, f64Sqrt: 0x9f, f64Add: 0xa0, f64Sub: 0xa1, f64Mul: 0xa2, f64Div: 0xa3, f64Min: 0xa4, f64Max: 0xa5,
  select: 0x1b, drop: 0x1a, ret: 0x0f,
} as const;

/** SIMD opcodes (after 0xfd) for pairs of f64. */
export const Simd = {
  f64x2Splat: 0x14, f64x2ExtractLane: 0x21, f64x2ReplaceLane: 0x22,
  f64x2Add: 0xf0, f64x2Sub: 0xf1, f64x2Mul: 0xf2,
} as const;

interface ImportedFunction { module: string; field: string; type: number }

/**
 * A module: imported functions (math from the host), one imported memory
 * (shared when threads use it), functions and their exports.
 */
export class WasmModule {
  private readonly types: string[] = [];
  private readonly typeBytes: number[][] = [];
  private readonly imported: ImportedFunction[] = [];
  private readonly functions: { type: number; body: FunctionBuilder; exportName?: string }[] = [];
  private memory?: { pages: number; shared: boolean };

  private typeIndex(params: readonly ValueType[], results: readonly ValueType[]): number {
    const key = `${params.join(',')}>${results.join(',')}`;
    let k = this.types.indexOf(key);
    if (k < 0) {
      k = this.types.length;
      this.types.push(key);
      this.typeBytes.push([0x60, ...vector(params.map((p) => [p])), ...vector(results.map((r) => [r]))]);
    }
    return k;
  }

  /** Import a function (all imports must come before the first defined function is added); its index. */
  importFunction(module: string, field: string, params: readonly ValueType[], results: readonly ValueType[]): number {
    if (this.functions.length) throw new Error('WasmModule: import functions before defining any');
    this.imported.push({ module, field, type: this.typeIndex(params, results) });
    return this.imported.length - 1;
  }

  /** Import the memory `env.memory` with exactly this many 64 KiB pages. */
  importMemory(pages: number, shared: boolean): void {
    this.memory = { pages, shared };
  }

  /** Define a function (exported under `exportName` when given); its index. */
  addFunction(body: FunctionBuilder, exportName?: string): number {
    this.functions.push({ type: this.typeIndex(body.params, body.results), body, exportName });
    return this.imported.length + this.functions.length - 1;
  }

  bytes(): Uint8Array {
    const imports: number[][] = this.imported.map((f) => [...name(f.module), ...name(f.field), 0x00, ...leb(f.type)]);
    if (this.memory) {
      const { pages, shared } = this.memory;
      imports.push([...name('env'), ...name('memory'), 0x02, shared ? 0x03 : 0x01, ...leb(pages), ...leb(pages)]);
    }
    const exports = this.functions.flatMap((f, k) => (f.exportName ? [[...name(f.exportName), 0x00, ...leb(this.imported.length + k)]] : []));
    return new Uint8Array([
      0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
      ...section(1, vector(this.typeBytes)),
      ...section(2, vector(imports)),
      ...section(3, vector(this.functions.map((f) => leb(f.type)))),
      ...section(7, vector(exports)),
      ...section(10, vector(this.functions.map((f) => f.body.encode()))),
    ]);
  }
}
