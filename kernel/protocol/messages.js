/**
 * Jupyter message shapes (messaging protocol 5.3), as they travel between the transport and the
 * protocol layer. Content stays loosely typed here: each handler checks the fields it reads and
 * names the field and value when one is wrong.
 */
export const PROTOCOL_VERSION = '5.3';
//# sourceMappingURL=messages.js.map