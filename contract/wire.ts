/**
 * Typed arrays inside widget state. A result holds Float64Arrays and friends; the widget protocol
 * carries them as binary buffers. Each array becomes `{dtype, shape, buffer}` and the base
 * serializer lifts `buffer` out as a binary frame (or base64 in a saved notebook). The kernel side
 * (kernel/widgets.ts) writes the same shape.
 */
export type DType = 'float64' | 'float32' | 'int32' | 'uint32' | 'int16' | 'uint16' | 'int8' | 'uint8';

export type NumericArray =
  | Float64Array
  | Float32Array
  | Int32Array
  | Uint32Array
  | Int16Array
  | Uint16Array
  | Int8Array
  | Uint8Array;

export interface PackedArray {
  dtype: DType;
  shape: number[];
  buffer: DataView;
}

const CONSTRUCTORS = {
  float64: Float64Array,
  float32: Float32Array,
  int32: Int32Array,
  uint32: Uint32Array,
  int16: Int16Array,
  uint16: Uint16Array,
  int8: Int8Array,
  uint8: Uint8Array,
} as const;

function dtypeOf(array: ArrayBufferView): DType | null {
  for (const [dtype, ctor] of Object.entries(CONSTRUCTORS)) {
    if (array instanceof ctor) return dtype as DType;
  }
  return null;
}

/** Replace every typed array in a JSON-like value with `{dtype, shape, buffer}`. */
export function packArrays(value: unknown): unknown {
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    const dtype = dtypeOf(value);
    if (dtype === null) throw new TypeError(`cannot send a ${value.constructor.name} in widget state`);
    const length = (value as NumericArray).length;
    // The widget manager saves a view's whole underlying buffer (ipywidgets' remove_buffers): a
    // view into a larger buffer is copied first, so the saved bytes are the array's own.
    const own = value.byteOffset === 0 && value.byteLength === value.buffer.byteLength ? value : (value as NumericArray).slice();
    return { dtype, shape: [length], buffer: new DataView(own.buffer, own.byteOffset, own.byteLength) };
  }
  if (Array.isArray(value)) return value.map(packArrays);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [key, item] of Object.entries(value)) out[key] = packArrays(item);
    return out;
  }
  return value;
}

function isPacked(value: Record<string, unknown>): boolean {
  const buffer = value.buffer;
  return (
    typeof value.dtype === 'string' &&
    Object.hasOwn(CONSTRUCTORS, value.dtype) &&
    Array.isArray(value.shape) &&
    (buffer instanceof DataView || buffer instanceof ArrayBuffer || ArrayBuffer.isView(buffer))
  );
}

function unpackOne(value: Record<string, unknown>): NumericArray {
  const ctor = CONSTRUCTORS[value.dtype as DType];
  const raw = value.buffer as DataView | ArrayBuffer | ArrayBufferView;
  const bytes =
    raw instanceof ArrayBuffer
      ? new Uint8Array(raw)
      : new Uint8Array(raw.buffer, raw.byteOffset, raw.byteLength);
  if (bytes.byteLength % ctor.BYTES_PER_ELEMENT !== 0) {
    throw new RangeError(`${value.dtype} array: ${bytes.byteLength} bytes is not a whole number of elements`);
  }
  // A buffer saved before arrays were copied whole may hold more than the array: its shape says
  // how much is the array's.
  const shape = value.shape as unknown[];
  const count = shape.every((x) => typeof x === 'number') ? (shape as number[]).reduce((a, b) => a * b, 1) : bytes.byteLength / ctor.BYTES_PER_ELEMENT;
  const used = Math.min(bytes.byteLength, count * ctor.BYTES_PER_ELEMENT);
  // Copy into a fresh, aligned buffer: a view into a message frame may sit at an odd offset.
  const copy = new Uint8Array(used);
  copy.set(bytes.subarray(0, used));
  return new ctor(copy.buffer);
}

/** Inverse of packArrays: every `{dtype, shape, buffer}` becomes a typed array again. */
export function unpackArrays(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(unpackArrays);
  if (value !== null && typeof value === 'object' && !ArrayBuffer.isView(value) && !(value instanceof ArrayBuffer)) {
    const record = value as Record<string, unknown>;
    if (isPacked(record)) return unpackOne(record);
    const out: Record<string, unknown> = {};
    for (const [key, item] of Object.entries(record)) out[key] = unpackArrays(item);
    return out;
  }
  return value;
}

/** Every typed array's buffer in a value, for a transfer list (no copies across the worker edge). */
export function transferablesOf(value: unknown, into: ArrayBuffer[] = []): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    const buffer = value.buffer;
    if (buffer instanceof ArrayBuffer && !into.includes(buffer)) into.push(buffer);
  } else if (Array.isArray(value)) {
    for (const item of value) transferablesOf(item, into);
  } else if (value !== null && typeof value === 'object') {
    for (const item of Object.values(value)) transferablesOf(item, into);
  }
  return into;
}

export type BufferPath = (string | number)[];

/**
 * Lift every DataView/ArrayBuffer/typed array out of a state object (as ipywidgets' remove_buffers
 * does): the state keeps the rest, `buffers[i]` belongs at `buffer_paths[i]`. The input is not
 * modified.
 */
export function removeBuffers(state: Record<string, unknown>): {
  state: Record<string, unknown>;
  buffer_paths: BufferPath[];
  buffers: DataView[];
} {
  const buffer_paths: BufferPath[] = [];
  const buffers: DataView[] = [];
  const walk = (value: unknown, path: BufferPath): unknown => {
    if (value instanceof ArrayBuffer) {
      buffer_paths.push(path);
      buffers.push(new DataView(value));
      return null;
    }
    if (ArrayBuffer.isView(value)) {
      buffer_paths.push(path);
      buffers.push(new DataView(value.buffer, value.byteOffset, value.byteLength));
      return null;
    }
    if (Array.isArray(value)) return value.map((item, i) => walk(item, [...path, i]));
    if (value !== null && typeof value === 'object') {
      const out: Record<string, unknown> = {};
      for (const [key, item] of Object.entries(value)) out[key] = walk(item, [...path, key]);
      return out;
    }
    return value;
  };
  return { state: walk(state, []) as Record<string, unknown>, buffer_paths, buffers };
}

/** Put binary buffers back at their paths (in place), as DataViews. */
export function putBuffers(state: Record<string, unknown>, paths: BufferPath[], buffers: ArrayBufferView[]): void {
  paths.forEach((path, i) => {
    if (path.length === 0) throw new RangeError('buffer path is empty');
    let node: Record<string | number, unknown> = state;
    for (const key of path.slice(0, -1)) {
      const next = node[key];
      if (next === null || typeof next !== 'object') throw new RangeError(`buffer path ${JSON.stringify(path)} does not exist in the state`);
      node = next as Record<string | number, unknown>;
    }
    const buffer = buffers[i];
    if (buffer === undefined) throw new RangeError(`no buffer for path ${JSON.stringify(path)}`);
    node[path[path.length - 1]] = new DataView(buffer.buffer, buffer.byteOffset, buffer.byteLength);
  });
}

/**
 * A widget's entry in a notebook's saved widget state (`metadata.widgets[WIDGET_STATE_MIME].state`,
 * and the copy a chernel widget output carries), as JupyterLab writes it: binary buffers inline as
 * base64 beside their paths. The kernel and the lab write it alike.
 */
export function savedStateEntry(state: Record<string, unknown>): Record<string, unknown> {
  const split = removeBuffers(state);
  return {
    model_name: state._model_name,
    model_module: state._model_module,
    model_module_version: state._model_module_version,
    state: split.state,
    buffers: split.buffers.map((b, i) => ({
      path: split.buffer_paths[i],
      encoding: 'base64',
      data: base64(new Uint8Array(b.buffer, b.byteOffset, b.byteLength)),
    })),
  };
}

const BASE64 = new TextEncoder().encode('ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/');

/** Base64 of bytes, built as ASCII codes and decoded once (a string built char by char is slower). */
export function base64(bytes: Uint8Array): string {
  const out = new Uint8Array(4 * Math.ceil(bytes.length / 3));
  let o = 0;
  let i = 0;
  for (; i + 2 < bytes.length; i += 3) {
    const v = (bytes[i] << 16) | (bytes[i + 1] << 8) | bytes[i + 2];
    out[o++] = BASE64[v >> 18];
    out[o++] = BASE64[(v >> 12) & 63];
    out[o++] = BASE64[(v >> 6) & 63];
    out[o++] = BASE64[v & 63];
  }
  if (i < bytes.length) {
    const two = i + 1 < bytes.length;
    const v = (bytes[i] << 16) | (two ? bytes[i + 1] << 8 : 0);
    out[o++] = BASE64[v >> 18];
    out[o++] = BASE64[(v >> 12) & 63];
    out[o++] = two ? BASE64[(v >> 6) & 63] : 61; // '='
    out[o++] = 61;
  }
  return new TextDecoder().decode(out);
}
