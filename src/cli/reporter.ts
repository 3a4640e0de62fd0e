/** Where the CLI talks to the user: messages to stderr, silenced by --quiet; warnings always. */
export interface Reporter {
  info(message: string): void;
  warn(message: string): void;
  /** a progress line that rewrites itself on a terminal; nothing otherwise */
  progress(message: string): void;
  /** ends a progress line */
  done(): void;
}

export function createReporter(options: { quiet: boolean; stream?: NodeJS.WriteStream }): Reporter {
  const stream = options.stream ?? process.stderr;
  const tty = stream.isTTY === true;
  let open = false;
  const clear = () => {
    if (open) {
      stream.write('\r\x1b[K');
      open = false;
    }
  };
  return {
    info(message) {
      if (options.quiet) return;
      clear();
      stream.write(`${message}\n`);
    },
    warn(message) {
      clear();
      stream.write(`warning: ${message}\n`);
    },
    progress(message) {
      if (options.quiet || !tty) return;
      stream.write(`\r\x1b[K${message}`);
      open = true;
    },
    done() {
      clear();
    },
  };
}
