/** A malformed model or request: the message names the offending field and its value. */
export class ModelError extends Error {
  readonly field: string;
  constructor(field: string, problem: string) {
    super(`${field}: ${problem}`);
    this.name = 'ModelError';
    this.field = field;
  }
}

/** Render a user value for an error message, briefly. */
export function valueText(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number') return String(value);
  try {
    const text = JSON.stringify(value);
    return text === undefined ? String(value) : text.length > 80 ? text.slice(0, 77) + '...' : text;
  } catch {
    return String(value);
  }
}
