/**
 * stackPointerStart reads the initial value of a module's first mutable i32 global (wasm-ld's
 * __stack_pointer). Checked against V8's own reading of the same bytes: each test module exports that
 * global, and WebAssembly.Instance gives its value (WebAssembly core specification 2.0, §5.5.9–5.5.10).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { stackPointerStart } from '../../server/sandbox/wasm-stack';

/** Signed LEB128 (specification §5.2.2). */
function sleb(n: number): number[] {
  const out: number[] = [];
  for (;;) {
    const b = n & 0x7f;
    n >>= 7;
    if ((n === 0 && (b & 0x40) === 0) || (n === -1 && (b & 0x40) !== 0)) return [...out, b];
    out.push(b | 0x80);
  }
}

/** A module with the given globals (type, mutability, i32.const value), exporting the first as "g". */
function moduleWith(globals: { type: number; mutable: boolean; value: number }[]): Uint8Array<ArrayBuffer> {
  const body = [globals.length, ...globals.flatMap((g) => [g.type, g.mutable ? 1 : 0, 0x41, ...sleb(g.value), 0x0b])];
  const exports = [1, 1, 0x67, 0x03, 0];
  return new Uint8Array([0x00, 0x61, 0x73, 0x6d, 1, 0, 0, 0, 6, body.length, ...body, 7, exports.length, ...exports]);
}

function v8Reads(bytes: Uint8Array<ArrayBuffer>): number {
  const instance = new WebAssembly.Instance(new WebAssembly.Module(bytes));
  return (instance.exports.g as WebAssembly.Global).value as number;
}

describe('stackPointerStart', () => {
  it.each([66_560, 5_333_088, 1, 127, 128, 8_388_608])('reads %d as V8 does', (value) => {
    const bytes = moduleWith([{ type: 0x7f, mutable: true, value }, { type: 0x7f, mutable: false, value: 3 }]);
    expect(stackPointerStart(bytes)).toBe(v8Reads(bytes));
    expect(stackPointerStart(bytes)).toBe(value);
  });

  it('answers undefined when the first global is not a mutable i32, or the bytes are not a module', () => {
    const immutable = moduleWith([{ type: 0x7f, mutable: false, value: 4096 }]);
    expect(v8Reads(immutable)).toBe(4096);
    expect(stackPointerStart(immutable)).toBeUndefined();
    expect(stackPointerStart(new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9]))).toBeUndefined();
    expect(stackPointerStart(moduleWith([{ type: 0x7f, mutable: true, value: 66_560 }]).slice(0, 12))).toBeUndefined();
  });

  it('finds a stack top inside the QuickJS build the sandbox runs, below its 16 MB start size', () => {
    const wasm = readFileSync(createRequire(import.meta.url).resolve('@jitl/quickjs-wasmfile-release-sync/wasm'));
    const top = stackPointerStart(wasm);
    expect(top).toBeGreaterThan(64 * 1024);
    expect(top).toBeLessThan(16 * 1024 * 1024);
    // The C ABI keeps the stack pointer 16-byte aligned (WebAssembly tool conventions, BasicCABI.md).
    expect(top! % 16).toBe(0);
  });
});
