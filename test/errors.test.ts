import { describe, expect, it } from 'vitest';
import { WaxwaneError, inputError, oneLineMessage } from '../src/errors.js';

describe('oneLineMessage', () => {
  it('turns every kind of line break, with the spaces around it, into one space', () => {
    expect(oneLineMessage('a \n b\r\nc\rd\u2028e\u2029f\u0085g  \n\n  h')).toBe('a b c d e f g h');
  });

  it('shows other control characters as escapes, so none reaches the terminal', () => {
    expect(oneLineMessage('red \u001b[31mtext\u0000 \u007f\u009b end')).toBe('red \\u001B[31mtext\\u0000 \\u007F\\u009B end');
  });

  it('leaves tabs and ordinary text, accents and symbols alone', () => {
    expect(oneLineMessage('a\tb "é" ≥ 1… 😀')).toBe('a\tb "é" ≥ 1… 😀');
  });
});

describe('WaxwaneError', () => {
  it('is one line even when it quotes a value holding a line break', () => {
    const e = inputError({ file: 'cases.csv', line: 3, column: 'region' }, 'no region "North\nEast"', 'choose one');
    expect(e).toBeInstanceOf(WaxwaneError);
    expect(e.message).toBe('cases.csv, line 3, column "region": no region "North East"; choose one');
    expect(e.exitCode).toBe(2);
  });
});
