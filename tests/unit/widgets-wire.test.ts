// Widget state serialisation: typed arrays <-> {dtype, shape, buffer} and the binary buffers lifted
// out as ipywidgets' remove_buffers/put_buffers do (format: Jupyter widget message spec 2.x,
// "buffer_paths"; common practice).
import { describe, expect, it } from 'vitest';
import { packArrays, putBuffers, removeBuffers, transferablesOf, unpackArrays } from '../../contract/wire.js';

describe('widget state wire format', () => {
  it('round-trips every dtype through buffers, respecting byteOffset and byteLength', () => {
    // A view into the middle of a larger buffer, padded with sentinels that must not leak.
    const backing = new Float64Array([999, 1.5, -2.25, Math.PI, 999]);
    const middle = new Float64Array(backing.buffer, 8, 3);
    const result = {
      kind: 'curvature',
      curvature: middle,
      ints: new Int32Array([-7, 0, 2147483647]),
      bytes: new Uint8Array([0, 255]),
      singles: new Float32Array([0.5]),
      nested: [{ energies: new Float64Array([1, 2]) }],
      chern: 1,
      checks: { minGap: 0.5, warnings: [] as string[] },
    };
    const packed = packArrays(result) as Record<string, unknown>;
    const split = removeBuffers({ result: packed });
    expect(split.buffer_paths).toEqual([
      ['result', 'curvature', 'buffer'],
      ['result', 'ints', 'buffer'],
      ['result', 'bytes', 'buffer'],
      ['result', 'singles', 'buffer'],
      ['result', 'nested', 0, 'energies', 'buffer'],
    ]);
    expect(split.buffers[0].byteLength).toBe(24);
    // JSON travel of the non-binary part, as on the wire.
    const wireState = JSON.parse(JSON.stringify(split.state)) as Record<string, unknown>;
    // Buffers arrive as fresh copies (as from a websocket frame) at odd offsets.
    const arrived = split.buffers.map((b) => {
      const frame = new Uint8Array(b.byteLength + 3);
      frame.set(new Uint8Array(b.buffer, b.byteOffset, b.byteLength), 3);
      return new DataView(frame.buffer, 3, b.byteLength);
    });
    putBuffers(wireState, split.buffer_paths, arrived);
    const back = unpackArrays(wireState.result) as typeof result;
    expect(back.curvature).toBeInstanceOf(Float64Array);
    expect(Array.from(back.curvature)).toEqual([1.5, -2.25, Math.PI]);
    expect(back.ints).toBeInstanceOf(Int32Array);
    expect(Array.from(back.ints)).toEqual([-7, 0, 2147483647]);
    expect(Array.from(back.bytes)).toEqual([0, 255]);
    expect(back.singles).toBeInstanceOf(Float32Array);
    expect(Array.from(back.nested[0].energies)).toEqual([1, 2]);
    expect(back.chern).toBe(1);
    expect(back.checks).toEqual({ minGap: 0.5, warnings: [] });
  });

  it('a view into a larger buffer is saved as its own bytes: the widget manager saves a view\'s whole buffer (ipywidgets remove_buffers)', () => {
    const backing = new Float64Array([999, 1.5, -2.25, 999]);
    const packed = packArrays({ a: backing.subarray(1, 3) }) as { a: { buffer: DataView } };
    // What the manager would save: the DataView's whole underlying buffer.
    expect(new Float64Array(packed.a.buffer.buffer)).toEqual(new Float64Array([1.5, -2.25]));
  });

  it('reads an array from a saved buffer larger than its shape (states saved before views were copied)', () => {
    const saved = new Float64Array([1.5, -2.25, 999, 999]).buffer;
    const back = unpackArrays({ dtype: 'float64', shape: [2], buffer: saved }) as Float64Array;
    expect(Array.from(back)).toEqual([1.5, -2.25]);
  });

  it('unpacks buffers decoded from a saved notebook (ArrayBuffer) too', () => {
    const source = new Float64Array([3, 4]);
    const state = { dtype: 'float64', shape: [2], buffer: source.buffer.slice(0) };
    expect(Array.from(unpackArrays(state) as Float64Array)).toEqual([3, 4]);
  });

  it('refuses a buffer that is not a whole number of elements, naming the dtype', () => {
    const state = { dtype: 'float64', shape: [1], buffer: new DataView(new ArrayBuffer(12)) };
    expect(() => unpackArrays(state)).toThrow(/float64 array: 12 bytes/);
  });

  it('leaves look-alike plain objects alone', () => {
    const value = { dtype: 'float64', shape: [2], buffer: 'not binary' };
    expect(unpackArrays(value)).toEqual(value);
  });

  it('names a missing buffer path', () => {
    expect(() => putBuffers({ a: 1 }, [['a', 'b', 'c']], [new Uint8Array(1)])).toThrow(/\["a","b","c"\]/);
  });

  it('lists each transferable buffer once', () => {
    const shared = new Float64Array(4);
    const a = new Float64Array(shared.buffer, 0, 2);
    const b = new Float64Array(shared.buffer, 16, 2);
    expect(transferablesOf({ a, b, c: [new Int32Array(1)] })).toHaveLength(2);
  });
});
