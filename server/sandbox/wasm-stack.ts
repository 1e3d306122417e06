/**
 * Where the C stack of a wasm-ld/emscripten module starts: the initial value of its first mutable i32
 * global, which wasm-ld always makes `__stack_pointer` (WebAssembly core specification, binary format
 * §5.5.9 global section; LLVM's WebAssembly object file conventions). The stack grows down from there,
 * so at rest, between calls into the module, every byte below that address down to the end of the
 * static data is dead. undefined when the binary does not look like that.
 */
export function stackPointerStart(wasm: Uint8Array): number | undefined {
  let pos = 8; // magic + version
  const u32 = (): number => {
    let result = 0;
    let shift = 0;
    for (;;) {
      const b = wasm[pos++];
      if (b === undefined) throw new RangeError('truncated');
      result |= (b & 0x7f) << shift;
      if ((b & 0x80) === 0) return result >>> 0;
      shift += 7;
    }
  };
  const i32 = (): number => {
    let result = 0;
    let shift = 0;
    let b: number;
    do {
      const next = wasm[pos++];
      if (next === undefined) throw new RangeError('truncated');
      b = next;
      result |= (b & 0x7f) << shift;
      shift += 7;
    } while (b & 0x80);
    return shift < 32 && b & 0x40 ? result | (-1 << shift) : result;
  };
  try {
    if (wasm[0] !== 0x00 || wasm[1] !== 0x61 || wasm[2] !== 0x73 || wasm[3] !== 0x6d) return undefined;
    while (pos < wasm.length) {
      const id = wasm[pos++];
      const size = u32();
      const end = pos + size;
      if (id === 6) {
        const count = u32();
        for (let g = 0; g < count; g++) {
          const type = wasm[pos++];
          const mutable = wasm[pos++];
          const op = wasm[pos++];
          if (type === 0x7f && mutable === 1 && op === 0x41) {
            const value = i32();
            return wasm[pos] === 0x0b && value > 0 ? value : undefined;
          }
          return undefined;
        }
        return undefined;
      }
      pos = end;
    }
  } catch {
    return undefined;
  }
  return undefined;
}
