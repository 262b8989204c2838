/**
 * Argument parsing for the CLI commands: node:util parseArgs (strict, positionals allowed), with
 * its errors put in our own words so every command says the same thing for the same mistake.
 */
import { parseArgs } from 'node:util';

export interface OptionSpec {
  type: 'string' | 'boolean';
  multiple?: boolean;
  short?: string;
  /** what to say when the value is missing, after the option's name (default "needs a value") */
  needs?: string;
}

export type Parsed<O extends Record<string, OptionSpec>> = {
  values: { [K in keyof O]?: O[K]['type'] extends 'boolean' ? boolean : O[K]['multiple'] extends true ? string[] : string };
  positionals: string[];
};

/** Parses argv; returns a plain-words error (one line, no usage) when it cannot. */
export function parseCli<O extends Record<string, OptionSpec>>(argv: string[], options: O): Parsed<O> | { error: string } {
  const spec: Record<string, { type: 'string' | 'boolean'; multiple?: boolean; short?: string }> = {};
  for (const [name, o] of Object.entries(options)) spec[name] = { type: o.type, ...(o.multiple ? { multiple: true } : {}), ...(o.short ? { short: o.short } : {}) };
  try {
    const r = parseArgs({ args: argv, options: spec, allowPositionals: true, strict: true });
    return { values: r.values as Parsed<O>['values'], positionals: r.positionals };
  } catch (e) {
    const code = (e as { code?: string }).code;
    const message = (e as Error).message;
    const name = /'(-[^' ]+)/.exec(message)?.[1] ?? '';
    if (code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') return { error: `unknown option ${name}` };
    if (code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE') {
      if (/does not take an argument/.test(message)) return { error: `${name} takes no value` };
      return { error: `${name} ${options[name.replace(/^--/, '')]?.needs ?? 'needs a value'}` };
    }
    throw e;
  }
}
