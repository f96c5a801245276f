// Option parsing on node's own parseArgs, with usage errors turned into messages (exit 2), never throws.
import { parseArgs, type ParseArgsConfig } from 'node:util';

export class UsageError extends Error {}

export type OptionSpec = NonNullable<ParseArgsConfig['options']>;

export type OptionValues = Record<string, string | boolean | (string | boolean)[] | undefined>;

export function parseCommandArgs(argv: string[], options: OptionSpec): { values: OptionValues; positionals: string[] } {
  try {
    const r = parseArgs({ args: argv, options: { ...options, help: { type: 'boolean', short: 'h' } }, allowPositionals: true, strict: true });
    return { values: r.values as OptionValues, positionals: r.positionals };
  } catch (e) {
    throw new UsageError((e as Error).message.replace(/^TypeError \[[A-Z_]+\]: /, ''));
  }
}

/** A number option in degrees (or plain), with the option named in the message. */
export function numberOption(value: string | undefined, name: string, fallback?: number): number {
  if (value === undefined) {
    if (fallback === undefined) throw new UsageError(`--${name} is required`);
    return fallback;
  }
  const v = Number(value);
  if (!Number.isFinite(v) || value.trim() === '') throw new UsageError(`--${name} must be a number, got "${value}"`);
  return v;
}

export function intOption(value: string | undefined, name: string, fallback?: number): number {
  const v = numberOption(value, name, fallback);
  if (!Number.isInteger(v)) throw new UsageError(`--${name} must be a whole number, got "${value}"`);
  return v;
}
