/** Bounds of command-line options, shared by the option parsers and the commands. */

/** Longest forecast horizon, days. */
export const MAX_HORIZON = 365;
