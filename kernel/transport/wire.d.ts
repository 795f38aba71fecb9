/**
 * The wire format: identities, `<IDS|MSG>`, HMAC signature, four JSON frames, raw buffers.
 *
 * Order of checks on an incoming message (never parse what is not signed):
 * framing -> signature on the raw frames (constant time, length first) -> replay -> JSON.
 */
import type { Message, Outgoing } from '../protocol/messages.js';
export declare class Signer {
    private readonly key;
    private readonly algorithm;
    constructor(key: string, scheme: string);
    /** An empty key disables signing, as the protocol specifies. */
    get enabled(): boolean;
    sign(parts: readonly Uint8Array[]): string;
    verify(signature: Uint8Array, parts: readonly Uint8Array[]): boolean;
}
/** Refuses a signature seen before. Bounded: the oldest entries go first. */
export declare class ReplayGuard {
    private readonly capacity;
    private readonly seen;
    constructor(capacity?: number);
    /** Records the signature; false if it was already recorded. */
    admit(signature: string): boolean;
}
export type Decoded = {
    ok: true;
    message: Message;
} | {
    ok: false;
    reason: string;
};
export declare function decode(frames: Buffer[], signer: Signer, replay: ReplayGuard): Decoded;
export declare function encode(message: Outgoing, signer: Signer): Buffer[];
