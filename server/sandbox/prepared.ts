/**
 * A QuickJS runtime and context with the script API already evaluated, kept as an image of the WASM
 * memory taken at that moment. Every run after the first starts by copying the image back, so each
 * run begins from the same bytes a freshly made context would have (and nothing a previous run left
 * behind survives: its globals, its objects, its pending jobs, the allocator's state). Compiling the
 * prelude costs QuickJS about a millisecond per context; copying the image back costs a small fraction
 * of that, which is most of what a sweep point costs.
 *
 * Everything of QuickJS lives in the linear memory except the WASM stack pointer, which is back at its
 * base whenever no call into WASM is under way — the only time an image is taken or restored. A run
 * that ends with a trap or an abort leaves no such guarantee; the worker throws the whole module away
 * then (worker.ts).
 */
import type { QuickJSContext, QuickJSHandle, QuickJSRuntime, QuickJSWASMModule } from 'quickjs-emscripten';
import { installApi, type ContextBridge } from './bridge';

/**
 * quickjs-emscripten's table of host functions by id, the one piece of a runtime's state kept on the
 * JavaScript side (quickjs-emscripten 0.32, `QuickJSRuntime.hostRefs`). A nested recipe context made
 * during a run adds entries whose guest objects the image does not have, so it is restored with it.
 */
interface HostRefTable {
  nextId: number;
  freelist: number[];
  groups: Map<number, Map<number, object>>;
}

function hostRefs(rt: QuickJSRuntime): HostRefTable {
  const table = (rt as unknown as { hostRefs?: Partial<HostRefTable> }).hostRefs;
  if (!table || typeof table.nextId !== 'number' || !Array.isArray(table.freelist) || !(table.groups instanceof Map)) {
    throw new Error('sandbox: this quickjs-emscripten keeps its host references differently; see prepared.ts');
  }
  return table as HostRefTable;
}

function copyRefs(t: HostRefTable): HostRefTable {
  return { nextId: t.nextId, freelist: [...t.freelist], groups: new Map([...t.groups].map(([k, m]) => [k, new Map(m)])) };
}

/**
 * Bytes of `memory` up to its last non-zero word, plus a margin, rounded up to 4 kB: everything in
 * use. The allocator's header of the free space at the top of the heap is non-zero and lies above every
 * allocated block, so nothing in use can hide in the zeros above it.
 */
function usedBytes(memory: WebAssembly.Memory): number {
  const words = new BigUint64Array(memory.buffer);
  let i = words.length - 1;
  while (i >= 0 && words[i] === 0n) i--;
  return Math.min(memory.buffer.byteLength, roundUp((i + 1) * 8 + IMAGE_MARGIN));
}

const PAGE = 4096;
const IMAGE_MARGIN = 64 * 1024;
/** Zeros kept at the low end of the stack region, in case the static data ends in zeros of its own. */
const STATIC_TAIL_MARGIN = 256 * 1024;
/** A dead stack region shorter than this is copied back with the rest (not worth a second piece). */
const MIN_SKIP = 1024 * 1024;
const roundUp = (n: number) => Math.ceil(n / PAGE) * PAGE;

/** The longest run of all-zero 4 kB pages in bytes [0, end) of `bytes`: [start, stop). */
function longestZeroRun(bytes: Uint8Array, end: number): { start: number; stop: number } {
  const words = new BigUint64Array(bytes.buffer, bytes.byteOffset, Math.floor(end / 8));
  const perPage = PAGE / 8;
  let best = { start: 0, stop: 0 };
  let runStart = -1;
  for (let p = 0; p * perPage < words.length; p++) {
    let zero = true;
    for (let w = p * perPage, last = Math.min(words.length, w + perPage); w < last; w++) {
      if (words[w] !== 0n) {
        zero = false;
        break;
      }
    }
    if (zero && runStart < 0) runStart = p * PAGE;
    if ((!zero || (p + 1) * perPage >= words.length) && runStart >= 0) {
      const stop = zero ? (p + 1) * PAGE : p * PAGE;
      if (stop - runStart > best.stop - best.start) best = { start: runStart, stop };
      runStart = -1;
    }
  }
  return best;
}

/**
 * The pieces of the image to copy back: all of it, except the dead part of the C stack when its top
 * is known (wasm-stack.ts). Below the stack's top, above the static data, nothing is alive between
 * calls; the low end of that region is still copied (STATIC_TAIL_MARGIN), since where the static data
 * ends is not written in the binary.
 */
function pieces(image: Uint8Array, stackTop: number | undefined): { offset: number; bytes: Uint8Array }[] {
  const whole = [{ offset: 0, bytes: image }];
  if (stackTop === undefined || stackTop > image.length) return whole;
  const hi = Math.floor(stackTop / PAGE) * PAGE;
  const run = longestZeroRun(image, hi);
  const lo = run.start + STATIC_TAIL_MARGIN;
  if (run.stop - run.start < MIN_SKIP + STATIC_TAIL_MARGIN || hi - lo < MIN_SKIP) return whole;
  return [
    { offset: 0, bytes: image.slice(0, lo) },
    { offset: hi, bytes: image.slice(hi) },
  ];
}

export class PreparedContext {
  private bridge?: ContextBridge;
  private dirty = false;

  private constructor(
    readonly rt: QuickJSRuntime,
    readonly ctx: QuickJSContext,
    private readonly memory: WebAssembly.Memory,
    private readonly image: { offset: number; bytes: Uint8Array }[],
    private readonly refs: HostRefTable,
    /** Held, never disposed: keeps the host functions alive whatever a script deletes. */
    readonly hostObject: QuickJSHandle,
  ) {}

  /**
   * Make the runtime and context in a module that has nothing else in it (the memory must be that
   * module's alone), evaluate the prelude, and take the image. `stackTop`: where the module's C stack
   * starts (wasm-stack.ts), when known; without it the whole image is copied back each time.
   */
  static create(mod: QuickJSWASMModule, memory: WebAssembly.Memory, memoryLimitBytes: number, stackTop?: number): PreparedContext {
    const rt = mod.newRuntime();
    rt.setMemoryLimit(memoryLimitBytes);
    const slot: { prepared?: PreparedContext } = {};
    // Registered once; the image keeps QuickJS's side of it switched on.
    rt.setInterruptHandler(() => slot.prepared?.bridge?.run.shouldInterrupt() ?? false);
    const ctx = rt.newContext();
    const hostObject = installApi(ctx, () => {
      const b = slot.prepared?.bridge;
      if (!b) throw new Error('sandbox: the script API was called outside a run');
      return b;
    });
    // quickjs-emscripten caches these handles on first use; made now, they point into the image.
    for (const h of [ctx.undefined, ctx.null, ctx.true, ctx.false, ctx.global]) void h.alive;
    const image = pieces(new Uint8Array(memory.buffer, 0, usedBytes(memory)).slice(), stackTop);
    slot.prepared = new PreparedContext(rt, ctx, memory, image, copyRefs(hostRefs(rt)), hostObject);
    return slot.prepared;
  }

  /** Start a run answered by `bridge`: memory back to the image first, when a run has been here since. */
  begin(bridge: ContextBridge): void {
    if (this.dirty) this.restore();
    this.dirty = true;
    this.bridge = bridge;
  }

  end(): void {
    this.bridge = undefined;
  }

  private restore(): void {
    const heap = new Uint8Array(this.memory.buffer);
    for (const p of this.image) heap.set(p.bytes, p.offset);
    const live = hostRefs(this.rt);
    const saved = copyRefs(this.refs);
    live.nextId = saved.nextId;
    live.freelist = saved.freelist;
    live.groups = saved.groups;
  }
}
