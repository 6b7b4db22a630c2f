// Shared command-line plumbing: option parsing with one-line usage errors, and the error types
// that main() turns into exit codes (2 for the user's mistakes, 1 for everything else).
import { parseArgs, type ParseArgsConfig } from 'node:util';

/** A mistake in how a command was called: printed as one line, exit 2. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export interface Command {
  name: string;
  /** one line for the command list */
  summary: string;
  /** the full --help text */
  help: string;
  run(argv: string[]): Promise<number>;
}

type Options = NonNullable<ParseArgsConfig['options']>;

/** util.parseArgs with `--help` added and its errors turned into one clear UsageError line. */
export function parseOptions<O extends Options>(argv: string[], options: O, command: string) {
  try {
    return parseArgs({ args: argv, options: { ...options, help: { type: 'boolean', short: 'h' } }, allowPositionals: true, strict: true });
  } catch (e) {
    const msg = (e as Error).message.split('\n')[0].replace(/\. To specify a positional argument.*$/, '');
    throw new UsageError(`${command}: ${msg} (see 'axonloom ${command} --help')`);
  }
}

/** "300,300,300" → [300, 300, 300] */
export function parseVec3(text: string, what: string): [number, number, number] {
  const parts = text.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== 3 || parts.some((p) => p === '') || nums.some((n) => !Number.isFinite(n))) {
    throw new UsageError(`${what} must be three numbers x,y,z in µm (got "${text}")`);
  }
  return nums as [number, number, number];
}

export function parseIntOption(text: string | undefined, what: string, min: number, max = Number.MAX_SAFE_INTEGER): number | undefined {
  if (text === undefined) return undefined;
  const n = Number(text);
  if (!Number.isInteger(n) || n < min || n > max) throw new UsageError(`${what} must be a whole number from ${min} to ${max} (got "${text}")`);
  return n;
}
