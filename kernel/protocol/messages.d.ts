/**
 * Jupyter message shapes (messaging protocol 5.3), as they travel between the transport and the
 * protocol layer. Content stays loosely typed here: each handler checks the fields it reads and
 * names the field and value when one is wrong.
 */
export declare const PROTOCOL_VERSION = "5.3";
export type Channel = 'shell' | 'control' | 'stdin' | 'iopub';
export interface Header {
    msg_id: string;
    msg_type: string;
    session: string;
    username: string;
    date: string;
    version: string;
}
export type Dict = Record<string, unknown>;
/** A message as received: verified, parsed, with the routing identities it came with. */
export interface Message {
    identities: Buffer[];
    header: Header;
    parent_header: Dict;
    metadata: Dict;
    content: Dict;
    buffers: Uint8Array[];
}
/** A message to send: the transport adds the signature and the delimiter. */
export interface Outgoing {
    identities: Buffer[];
    header: Header;
    parent_header: Dict;
    metadata: Dict;
    content: Dict;
    buffers: Uint8Array[];
}
/** The transport as seen by the protocol layer: sockets, signing and framing live behind it. */
export interface Transport {
    /** Called for every message that passed signature, replay and framing checks. */
    onMessage(handler: (channel: Channel, message: Message) => void): void;
    send(channel: Channel, message: Outgoing): void;
    close(): Promise<void>;
}
