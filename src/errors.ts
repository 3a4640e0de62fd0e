/**
 * The tool's own error type. Anything the user can fix (bad data, bad options, bad files)
 * is a `WaxwaneError` with exit code 2; the CLI prints its one-line message and nothing else.
 * Anything else reaching the top level is an internal error (exit 1).
 */
export class WaxwaneError extends Error {
  readonly exitCode: number;
  constructor(message: string, exitCode = 2) {
    super(message);
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
