/**
 * Canonical JSON and a 64-bit FNV-1a digest: how plans, checkpoints and shard outputs recognise
 * one another and detect corruption, identically in Node, a browser and a cluster shard.
 */

/** JSON with object keys sorted, so equal data gives equal text whatever the key order. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    const text = JSON.stringify(value);
    return text === undefined ? 'null' : text;
  }
  if (ArrayBuffer.isView(value)) return canonicalJson(Array.from(value as unknown as ArrayLike<number>));
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
}

/** FNV-1a, 64 bits, over the UTF-16 code units of `text`; 16 hex digits. */
export function digest(text: string): string {
  let hi = 0xcbf29ce4 >>> 0;
  let lo = 0x84222325 >>> 0;
  for (let i = 0; i < text.length; i++) {
    lo = (lo ^ text.charCodeAt(i)) >>> 0;
    // Multiply (hi, lo) by the FNV prime 2^40 + 0x1b3, modulo 2^64, in 32-bit halves.
    const loTimes = lo * 0x1b3;
    const carry = Math.floor(loTimes / 0x100000000);
    const newLo = loTimes >>> 0;
    hi = (Math.imul(hi, 0x1b3) + carry + (lo << 8)) >>> 0;
    lo = newLo;
  }
  return hi.toString(16).padStart(8, '0') + lo.toString(16).padStart(8, '0');
}
