import { REDUCTION_BLOCK } from './wasm/stepperLayout.ts';

/**
 * Threads that run a stepper's WebAssembly kernels on their share of the rows,
 * over memory they all share. The calling thread is member 0 and does its own
 * share; helpers (Node worker threads or Web Workers) hold nothing but the
 * module and the memory, so they need no solver code. Commands travel through
 * a small shared control block: the caller writes the kernel and its
 * arguments, bumps a generation counter and wakes the helpers
 * (Atomics.notify); each helper runs its block range, counts itself done and
 * wakes the caller. A command costs microseconds, so it pays for sweeps of
 * more than a few thousand rows.
 *
 * Each member takes a contiguous range of the reduction blocks (see
 * stepperLayout), so the results do not depend on how many members there are.
 */

/** What a spawned helper is to the team: a message port and a way to end it. */
export interface HelperThread {
  postMessage(message: unknown): void;
  onMessage(listener: (message: { kind: string; error?: string }) => void): void;
  terminate(): void;
}

/** Start a helper running `code` (Node: a worker thread with eval; a browser: a worker from a Blob). */
export type SpawnHelper = (code: string) => HelperThread;

/** Blocks of rows a member should have at least, for threads to be worth their wake-up (16k rows). */
export const MIN_BLOCKS_PER_MEMBER = Math.ceil(16_384 / REDUCTION_BLOCK);

const GENERATION = 0, DONE = 1, COMMAND = 2, KERNEL = 3, ERROR = 4, FAULT = 5, MEMBERS = 6, BLOCKS = 7, RESULTS = 16;
const CALL = 0, LOAD = 1, EXIT = 2;
/** Checks of a shared counter before sleeping on it (about 10–50 µs): commands and their ends usually come that soon. */
const SPIN = 20_000;
const CONTROL_SLOTS = 16 + 64;
const MESSAGE_BYTES = 512;
/** Kernel names in the order their ids travel in the control block. */
export const TEAM_KERNELS = ['explicit', 'rhs', 'cgStart', 'cgProduct', 'cgUpdate', 'cgDirection', 'cgTotal', 'cgShift', 'geometry', 'checkMove'] as const;
export type TeamKernel = (typeof TEAM_KERNELS)[number];

/**
 * The helper's code: wait for a command, run the kernel on this member's block
 * range, count done. Plain JavaScript, the same in Node and browsers.
 */
const HELPER_CODE = `
const isNode = typeof process !== 'undefined' && !!(process.versions && process.versions.node) && typeof self === 'undefined';
const port = isNode ? require('node:worker_threads').parentPort : self;
const listen = (f) => (isNode ? port.on('message', f) : (self.onmessage = (e) => f(e.data)));
const GENERATION = ${GENERATION}, DONE = ${DONE}, COMMAND = ${COMMAND}, KERNEL = ${KERNEL}, ERROR = ${ERROR}, FAULT = ${FAULT}, MEMBERS = ${MEMBERS}, BLOCKS = ${BLOCKS}, RESULTS = ${RESULTS};
const KERNELS = ${JSON.stringify(TEAM_KERNELS)};
const SPIN = ${SPIN};
let control, args, text, index, exportsOf = null;
const math = {};
for (const name of ['exp', 'log', 'sin', 'cos', 'tan', 'sinh', 'cosh', 'tanh', 'atan', 'atan2', 'pow']) math[name] = Math[name];
function fail(e) {
  if (Atomics.compareExchange(control, ERROR, 0, index + 1) === 0) {
    const bytes = new TextEncoder().encode(String(e && e.message ? e.message : e)).subarray(0, text.length);
    text.fill(0);
    text.set(bytes);
  }
}
// the last command generation this helper has taken: kept across serve() calls, so a command issued
// while it was loading a module (away from its wait) is not missed
let seen = 0;
function serve() {
  for (;;) {
    // spin briefly (a command usually follows within microseconds), then sleep until woken
    for (let k = 0; k < SPIN && Atomics.load(control, GENERATION) === seen; k++);
    Atomics.wait(control, GENERATION, seen);
    seen = Atomics.load(control, GENERATION);
    const command = Atomics.load(control, COMMAND);
    if (command === ${LOAD}) return;
    if (command === ${EXIT}) { if (!isNode) self.close(); else process.exit(0); return; }
    const members = control[MEMBERS], blocks = control[BLOCKS];
    let result = 0;
    if (index < members) {
      try {
        if (control[FAULT] === index + 1) { control[FAULT] = 0; throw new Error('a fault injected for a test'); }
        const b0 = Math.floor((index * blocks) / members), b1 = Math.floor(((index + 1) * blocks) / members);
        const name = KERNELS[control[KERNEL]];
        if (b1 > b0) result = exportsOf[name](b0, b1, args[0], args[1], args[2]) | 0;
      } catch (e) {
        fail(e);
      }
    }
    control[RESULTS + index] = result;
    Atomics.add(control, DONE, 1);
    Atomics.notify(control, DONE);
  }
}
listen((m) => {
  if (m.kind === 'init') {
    control = new Int32Array(m.control); args = new Float64Array(m.args); text = new Uint8Array(m.text); index = m.index;
    port.postMessage({ kind: 'ready' });
    serve();
  } else if (m.kind === 'load') {
    try {
      exportsOf = new WebAssembly.Instance(m.module, { env: { memory: m.memory }, math }).exports;
    } catch (e) {
      fail(e);
    }
    Atomics.add(control, DONE, 1);
    Atomics.notify(control, DONE);
    serve();
  }
});
`;

export class ThreadTeam {
  /** members, the calling thread included */
  readonly size: number;
  /** the fewest reduction blocks a member takes: smaller sweeps use fewer members (tests set 1) */
  readonly minBlocksPerMember: number;
  private readonly control: Int32Array;
  private readonly args: Float64Array;
  private readonly text: Uint8Array;
  private readonly helpers: HelperThread[];
  private exports: Record<string, (...a: number[]) => number> | null = null;
  /** whose module the members hold (a stepper) */
  private owner: object | null = null;
  private disposed = false;

  private constructor(size: number, minBlocksPerMember: number, helpers: HelperThread[], control: Int32Array, args: Float64Array, text: Uint8Array) {
    this.size = size;
    this.minBlocksPerMember = minBlocksPerMember;
    this.helpers = helpers;
    this.control = control;
    this.args = args;
    this.text = text;
  }

  /** True where threads can share memory (Node; a cross-origin isolated page). */
  static available(): boolean {
    return typeof SharedArrayBuffer !== 'undefined' && typeof Atomics !== 'undefined' && typeof WebAssembly !== 'undefined';
  }

  /** A team of `size` members: the caller and size − 1 helpers, started and ready. */
  static async create(size: number, spawn: SpawnHelper, minBlocksPerMember = MIN_BLOCKS_PER_MEMBER): Promise<ThreadTeam> {
    if (!ThreadTeam.available()) throw new Error('threads need SharedArrayBuffer, which this environment does not offer');
    const control = new Int32Array(new SharedArrayBuffer(4 * CONTROL_SLOTS));
    const args = new Float64Array(new SharedArrayBuffer(8 * 8));
    const text = new Uint8Array(new SharedArrayBuffer(MESSAGE_BYTES));
    const helpers: HelperThread[] = [];
    const ready: Promise<void>[] = [];
    for (let k = 1; k < size; k++) {
      const h = spawn(HELPER_CODE);
      ready.push(new Promise((resolve, reject) => h.onMessage((m) => (m.kind === 'ready' ? resolve() : reject(new Error(m.error ?? 'a helper thread failed to start'))))));
      h.postMessage({ kind: 'init', control: control.buffer, args: args.buffer, text: text.buffer, index: k });
      helpers.push(h);
    }
    await Promise.all(ready);
    return new ThreadTeam(size, minBlocksPerMember, helpers, control, args, text);
  }

  /**
   * Give every member `owner`'s module over its shared memory (unless they
   * hold it already); afterwards `run` calls its kernels. Blocks until every
   * helper has it.
   */
  load(owner: object, module: WebAssembly.Module, memory: WebAssembly.Memory, exports: Record<string, (...a: number[]) => number>): void {
    if (this.owner === owner) return;
    this.owner = owner;
    this.exports = exports;
    for (const h of this.helpers) h.postMessage({ kind: 'load', module, memory });
    this.command(LOAD, () => {});
    this.throwIfFailed();
  }

  /**
   * Run a kernel on `blocks` reduction blocks split among `members` members
   * (at most the team's size); returns the OR of the members' results.
   */
  run(kernel: TeamKernel, blocks: number, members: number, a0 = 0, a1 = 0, a2 = 0): number {
    const m = Math.max(1, Math.min(this.size, members));
    const own = () => {
      const b1 = Math.floor(blocks / m);
      return b1 > 0 ? this.exports![kernel](0, b1, a0, a1, a2) | 0 : 0;
    };
    if (m === 1 || this.helpers.length === 0) return own();
    const c = this.control;
    this.args[0] = a0;
    this.args[1] = a1;
    this.args[2] = a2;
    c[KERNEL] = TEAM_KERNELS.indexOf(kernel);
    c[MEMBERS] = m;
    c[BLOCKS] = blocks;
    let result = 0;
    this.command(CALL, () => { result = own(); });
    for (let k = 1; k < this.size; k++) result |= c[RESULTS + k];
    this.throwIfFailed();
    return result;
  }

  /** Make helper `index` (1 …) throw on the next call: how tests check that a failing thread is reported. */
  failNext(index: number): void {
    Atomics.store(this.control, FAULT, index + 1);
  }

  /** End the helpers. */
  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    if (this.helpers.length) {
      Atomics.store(this.control, COMMAND, EXIT);
      Atomics.add(this.control, GENERATION, 1);
      Atomics.notify(this.control, GENERATION);
      for (const h of this.helpers) h.terminate();
    }
  }

  /** Issue a command to every helper, do `mine` meanwhile, and wait until all helpers are done. */
  private command(kind: number, mine: () => void): void {
    const c = this.control;
    Atomics.store(c, DONE, 0);
    Atomics.store(c, COMMAND, kind);
    Atomics.add(c, GENERATION, 1);
    Atomics.notify(c, GENERATION);
    let failure: unknown;
    try {
      mine();
    } catch (e) {
      failure = e;
    }
    const helpers = this.helpers.length;
    for (let k = 0; k < SPIN && Atomics.load(c, DONE) < helpers; k++);
    for (let d = Atomics.load(c, DONE); d < helpers; d = Atomics.load(c, DONE)) Atomics.wait(c, DONE, d, 1000);
    if (failure) throw failure;
  }

  private throwIfFailed(): void {
    const who = Atomics.exchange(this.control, ERROR, 0);
    if (who === 0) return;
    const message = new TextDecoder().decode(this.text.slice().filter((b) => b !== 0));
    throw new ThreadError(who - 1, message);
  }
}

/** A helper thread failed while running a kernel: the step did not happen. */
export class ThreadError extends Error {
  constructor(readonly thread: number, message: string) {
    super(`worker thread ${thread} failed: ${message}`);
    this.name = 'ThreadError';
  }
}
