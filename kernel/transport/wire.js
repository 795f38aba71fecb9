/**
 * The wire format: identities, `<IDS|MSG>`, HMAC signature, four JSON frames, raw buffers.
 *
 * Order of checks on an incoming message (never parse what is not signed):
 * framing -> signature on the raw frames (constant time, length first) -> replay -> JSON.
 */
import { createHmac, getHashes, timingSafeEqual } from 'node:crypto';
const DELIMITER = Buffer.from('<IDS|MSG>');
export class Signer {
    key;
    algorithm;
    constructor(key, scheme) {
        const match = /^hmac-(.+)$/.exec(scheme);
        if (!match || !getHashes().includes(match[1])) {
            throw new Error(`connection file: signature_scheme: unsupported value "${scheme}"`);
        }
        this.algorithm = match[1];
        this.key = Buffer.from(key, 'utf8');
    }
    /** An empty key disables signing, as the protocol specifies. */
    get enabled() {
        return this.key.length > 0;
    }
    sign(parts) {
        if (!this.enabled)
            return '';
        const hmac = createHmac(this.algorithm, this.key);
        for (const part of parts)
            hmac.update(part);
        return hmac.digest('hex');
    }
    verify(signature, parts) {
        if (!this.enabled)
            return true;
        const expected = Buffer.from(this.sign(parts), 'ascii');
        return signature.length === expected.length && timingSafeEqual(signature, expected);
    }
}
/** Refuses a signature seen before. Bounded: the oldest entries go first. */
export class ReplayGuard {
    capacity;
    seen = new Set();
    constructor(capacity = 1 << 16) {
        this.capacity = capacity;
    }
    /** Records the signature; false if it was already recorded. */
    admit(signature) {
        if (this.seen.has(signature))
            return false;
        this.seen.add(signature);
        if (this.seen.size > this.capacity) {
            const oldest = this.seen.values().next().value;
            if (oldest !== undefined)
                this.seen.delete(oldest);
        }
        return true;
    }
}
function isDict(value) {
    return typeof value === 'object' && value !== null && !Array.isArray(value);
}
function parseFrame(frame, name) {
    let value;
    try {
        value = JSON.parse(frame.toString('utf8'));
    }
    catch {
        return { ok: false, reason: `${name}: not valid JSON` };
    }
    if (!isDict(value))
        return { ok: false, reason: `${name}: expected a JSON object, got ${JSON.stringify(value)?.slice(0, 40)}` };
    return { ok: true, value };
}
export function decode(frames, signer, replay) {
    const split = frames.findIndex((f) => f.equals(DELIMITER));
    if (split < 0)
        return { ok: false, reason: 'no <IDS|MSG> delimiter' };
    if (frames.length < split + 6)
        return { ok: false, reason: `truncated: ${frames.length - split - 1} frames after the delimiter, need 5` };
    const signature = frames[split + 1];
    const parts = frames.slice(split + 2, split + 6);
    if (!signer.verify(signature, parts))
        return { ok: false, reason: 'bad signature' };
    if (signer.enabled && !replay.admit(signature.toString('ascii')))
        return { ok: false, reason: 'duplicate signature (replay)' };
    const names = ['header', 'parent_header', 'metadata', 'content'];
    const parsed = [];
    for (let i = 0; i < 4; i++) {
        const result = parseFrame(parts[i], names[i]);
        if (!result.ok)
            return result;
        parsed.push(result.value);
    }
    const header = parsed[0];
    for (const field of ['msg_id', 'msg_type']) {
        if (typeof header[field] !== 'string' || header[field] === '') {
            return { ok: false, reason: `header.${field}: expected a non-empty string, got ${JSON.stringify(header[field])}` };
        }
    }
    return {
        ok: true,
        message: {
            identities: frames.slice(0, split),
            header: header,
            parent_header: parsed[1],
            metadata: parsed[2],
            content: parsed[3],
            buffers: frames.slice(split + 6),
        },
    };
}
export function encode(message, signer) {
    const parts = [message.header, message.parent_header, message.metadata, message.content].map((part) => Buffer.from(JSON.stringify(part), 'utf8'));
    return [
        ...message.identities,
        DELIMITER,
        Buffer.from(signer.sign(parts), 'ascii'),
        ...parts,
        ...message.buffers.map((b) => Buffer.from(b.buffer, b.byteOffset, b.byteLength)),
    ];
}
//# sourceMappingURL=wire.js.map