/**
 * The tool's own error type. Anything the user can fix (bad data, bad options, bad files)
 * is a `WaxwaneError` with exit code 2; the CLI prints its one-line message and nothing else.
 * Anything else reaching the top level is an internal error (exit 1).
 */
export class WaxwaneError extends Error {
  readonly exitCode: number;
  /** @param message made one line by {@link oneLineMessage} (it may quote values from a file) */
  constructor(message: string, exitCode = 2) {
    super(oneLineMessage(message));
    this.name = 'WaxwaneError';
    this.exitCode = exitCode;
  }
}

/** Builds the one-line message for a problem in an input file: where, what, and what to do. */
export function inputError(
  where: { file: string; line?: number; column?: string; field?: string },
  what: string,
  fix: string,
): WaxwaneError {
  const parts = [where.file];
  if (where.line !== undefined) parts.push(`line ${where.line}`);
  if (where.column !== undefined) parts.push(`column "${where.column}"`);
  if (where.field !== undefined) parts.push(`field "${where.field}"`);
  return new WaxwaneError(`${parts.join(', ')}: ${what}; ${fix}`);
}

/**
 * A message as one terminal line: line breaks of every kind (CR, LF, NEL, U+2028, U+2029),
 * with the spaces around them, become one space; other control characters (C0 but tab, DEL,
 * C1) become visible `\u001B` escapes, so that a value quoted from a file (a region name, a
 * header) can neither break the line nor send escape sequences to the terminal.
 */
export function oneLineMessage(message: string): string {
  return message
    .replace(/[^\S\r\n\u0085\u2028\u2029]*[\r\n\u0085\u2028\u2029]+\s*/g, ' ')
    .replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, (c) => `\\u${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`);
}
