// Every host the contract runs in (pages, workers, Node) has these, though no ECMAScript lib declares them.
declare class TextEncoder {
  encode(input?: string): Uint8Array;
}
declare class TextDecoder {
  decode(input?: Uint8Array): string;
}
