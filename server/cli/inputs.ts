// What every subcommand reads from the command line and the file system: options,
// the netlist files with their includes, the deck, the length scale.

import { readFileSync, statSync } from 'node:fs';
import { dirname, isAbsolute, relative, resolve, sep } from 'node:path';
import { parseArgs, type ParseArgsConfig } from 'node:util';
import type { Design, Diagnostic, ReadOptions } from '../../grammar/index';
import { includeReferences, parseSpiceNumber, readDesign } from '../../grammar/index';
import { defaultDeck } from '../../rules/default-deck';
import { validateDeck } from '../../rules/validate-deck';
import type { Deck } from '../../shared/deck';

/** A problem with what the user gave: printed as one line, exit status 2. */
export class InputError extends Error {}

export interface LoadedFiles {
  /** Path relative to the common root (forward slashes) → text. */
  files: Map<string, string>;
  /** The given files, in the same keys. */
  entries: string[];
  /** Key → path to show (relative to the working directory). */
  display: Map<string, string>;
}

/** Where the user ran the command: `npm run` moves to the package folder and keeps the original in INIT_CWD. */
export function workingDirectory(): string {
  return process.env.INIT_CWD ?? process.cwd();
}

const decoder = new TextDecoder('utf-8', { fatal: false });

function readText(path: string): string {
  let st;
  try {
    st = statSync(path);
  } catch (e) {
    throw new InputError(`${path}: cannot read: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}`);
  }
  if (st.isDirectory()) throw new InputError(`${path}: is a folder; give the netlist files`);
  try {
    return decoder.decode(readFileSync(path));
  } catch (e) {
    throw new InputError(`${path}: cannot read: ${(e as Error).message}`);
  }
}

function commonRoot(dirs: string[]): string {
  let root = dirs[0];
  for (const d of dirs.slice(1)) {
    while (!(d === root || d.startsWith(root.endsWith(sep) ? root : root + sep))) {
      const up = dirname(root);
      if (up === root) break;
      root = up;
    }
  }
  return root;
}

function under(path: string, dir: string): boolean {
  const rel = relative(dir, path);
  return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel);
}

/** Read the given files and, transitively, the files they include from inside the given files' folders. */
export function loadFiles(paths: string[], cwd = workingDirectory()): LoadedFiles {
  const absolute = paths.map((p) => resolve(cwd, p));
  const allowed = [...new Set(absolute.map((p) => dirname(p)))];
  const root = commonRoot(allowed);
  const key = (abs: string) => relative(root, abs).split(sep).join('/');
  const files = new Map<string, string>();
  const display = new Map<string, string>();
  const queue: string[] = [];
  const add = (abs: string, required: boolean) => {
    const k = key(abs);
    if (files.has(k)) return;
    let text: string;
    try {
      text = readText(abs);
    } catch (e) {
      if (required) throw e;
      return; // a missing include is reported by the reader, with its line
    }
    files.set(k, text);
    const rel = relative(cwd, abs);
    display.set(k, rel && !rel.startsWith('..') ? rel : abs);
    queue.push(abs);
  };
  for (const abs of absolute) add(abs, true);
  while (queue.length) {
    const from = queue.shift()!;
    for (const ref of includeReferences(files.get(key(from))!)) {
      if (isAbsolute(ref) || /^[A-Za-z]:[\\/]/.test(ref)) continue; // refused by the reader
      for (const base of [dirname(from), root]) {
        const target = resolve(base, ref);
        if (!allowed.some((d) => under(target, d))) continue;
        try {
          if (statSync(target).isFile()) {
            add(target, false);
            break;
          }
        } catch {
          // not there; try the next base
        }
      }
    }
  }
  return { files, entries: absolute.map(key), display };
}

export function loadDeck(path: string | undefined): Deck {
  if (!path) return defaultDeck();
  let data: unknown;
  try {
    data = JSON.parse(readText(resolve(workingDirectory(), path)));
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${path}: not a JSON deck: ${(e as Error).message}`);
  }
  const v = validateDeck(data);
  if (!v.ok) throw new InputError(`${path}: not a valid deck:\n${v.issues.map((i) => `  ${i.path || '(deck)'}: ${i.message}`).join('\n')}`);
  return v.deck;
}


type Options = NonNullable<ParseArgsConfig['options']>;

/**
 * Parse a subcommand's arguments. Prints the usage and returns the exit status
 * (0 for --help, 2 for a malformed command line) when there is nothing to run.
 */
export function parseCommandLine<O extends Options>(
  command: string,
  usage: string,
  args: string[],
  options: O,
): { values: Record<keyof O, string | boolean | undefined>; positionals: string[] } | number {
  let parsed: { values: Record<string, string | boolean | undefined>; positionals: string[] };
  try {
    const config: ParseArgsConfig = { args, allowPositionals: true, options: { ...options, help: { type: 'boolean', short: 'h' } } };
    parsed = parseArgs(config) as typeof parsed;
  } catch (e) {
    process.stderr.write(`keepwell ${command}: ${(e as Error).message}\n\n${usage}\n`);
    return 2;
  }
  if (parsed.values.help) {
    process.stdout.write(usage + '\n');
    return 0;
  }
  return { values: parsed.values as Record<keyof O, string | boolean | undefined>, positionals: parsed.positionals };
}

/** `--scale F`: a length scale between 0 and 1; throws InputError otherwise. */
export function parseScale(value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  const r = parseSpiceNumber(value);
  if (!r.ok || !(r.value > 0) || r.value > 1) throw new InputError(`--scale "${value}" is not a length scale between 0 and 1 (e.g. 1e-6)`);
  return r.value;
}

/** How the reader should take the given files under this deck. */
export function readOptions(loaded: LoadedFiles, deck: Deck, extra: { top?: string; scale?: number }): ReadOptions {
  return {
    entry: loaded.entries,
    ...(extra.top ? { top: extra.top } : {}),
    ...(extra.scale !== undefined ? { scale: extra.scale } : {}),
    defaultScale: deck.scale,
    deviceMap: deck.deviceMap,
    supplies: deck.supplies,
  };
}

/** A design read from the command line's files under its deck, with the path to show for each file key. */
export interface CommandLineDesign {
  deck: Deck;
  design: Design;
  shown: (file: string) => string;
}

/**
 * Read the deck (`--deck`), the netlist files and `--scale`, then the design; its diagnostics go to standard error as
 * `file:line:column: severity: message`. Throws InputError when an input cannot be read.
 */
export function readCommandLineDesign(values: { deck?: string; scale?: string; top?: string }, paths: string[]): CommandLineDesign {
  const scale = parseScale(values.scale);
  const deck = loadDeck(values.deck);
  const loaded = loadFiles(paths);
  const design = readDesign(loaded.files, readOptions(loaded, deck, { top: values.top, scale }));
  const shown = (file: string) => loaded.display.get(file) ?? file;
  for (const d of design.diagnostics) process.stderr.write(formatDiagnostic(d, shown(d.file)) + '\n');
  return { deck, design, shown };
}

function formatDiagnostic(d: Diagnostic, file: string): string {
  return `${file}:${d.line}:${d.column}: ${d.severity}: ${d.message}${d.hint ? `\n  hint: ${d.hint}` : ''}`;
}
