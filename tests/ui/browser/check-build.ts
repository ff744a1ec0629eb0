// Look through a built client for addresses on other hosts. Keepwell ships every asset, so:
//  - no URL of a CDN or web-font service may appear anywhere;
//  - no remote URL may appear where a browser would fetch it on its own (HTML src/href,
//    CSS url() and @import) or name a script, style, font, image or wasm file;
//  - anything else (XML namespace names, links inside library error messages) is listed so a
//    person can see it is text, not a fetch.
// Run: npx tsx tests/ui/browser/check-build.ts [dist/client …]

import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';

const CDN_HOSTS = [
  'cdn.jsdelivr.net',
  'unpkg.com',
  'cdnjs.cloudflare.com',
  'esm.sh',
  'cdn.skypack.dev',
  'ga.jspm.io',
  'fonts.googleapis.com',
  'fonts.gstatic.com',
  'use.typekit.net',
  'fonts.bunny.net',
  'ajax.googleapis.com',
  'code.jquery.com',
  'stackpath.bootstrapcdn.com',
  'maxcdn.bootstrapcdn.com',
  'rsms.me',
];

/** Names, not locations: XML namespaces are compared as strings and never fetched. */
const NAMESPACES = /^https?:\/\/www\.w3\.org\/(2000\/svg|1999\/xhtml|1999\/xlink|1998\/Math\/MathML|XML\/1998\/namespace|2000\/xmlns\/?)$/;

const ASSET_EXTENSION = /\.(m?js|css|woff2?|ttf|otf|eot|png|jpe?g|gif|svg|webp|avif|wasm|json)(\?|#|$)/i;
const URL_PATTERN = /https?:\/\/[^\s'"`)<>\\]+/g;

export interface BuildScan {
  files: number;
  violations: { file: string; url: string; reason: string }[];
  /** Host → number of text mentions. */
  textMentions: Map<string, number>;
}

async function* walk(dir: string): AsyncGenerator<string> {
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) yield* walk(full);
    else yield full;
  }
}

export async function scanBuild(dir: string): Promise<BuildScan> {
  const scan: BuildScan = { files: 0, violations: [], textMentions: new Map() };
  for await (const file of walk(dir)) {
    if (!/\.(m?js|css|html|svg|json|webmanifest|txt|map)$/.test(file)) continue;
    scan.files++;
    const text = await readFile(file, 'utf8');
    const rel = path.relative(dir, file);
    const fetchedPositions = new Set<number>();
    if (/\.(css|html|svg)$/.test(file)) {
      for (const m of text.matchAll(/(?:url\(\s*['"]?|@import\s+['"]|(?:src|href|srcset|poster|data)\s*=\s*['"]?)(https?:\/\/)/gi)) {
        fetchedPositions.add(m.index! + m[0].length - m[1].length);
      }
    }
    for (const m of text.matchAll(URL_PATTERN)) {
      const url = m[0].replace(/[.,;]+$/, '');
      if (NAMESPACES.test(url)) continue;
      let host: string;
      try {
        host = new URL(url).host;
      } catch {
        continue;
      }
      if (CDN_HOSTS.some((h) => host === h || host.endsWith(`.${h}`))) scan.violations.push({ file: rel, url, reason: 'CDN or web-font host' });
      else if (fetchedPositions.has(m.index!)) scan.violations.push({ file: rel, url, reason: 'fetched by the browser (HTML attribute or CSS url/import)' });
      else if (ASSET_EXTENSION.test(new URL(url).pathname) && !/\.(md|html?)$/.test(new URL(url).pathname)) scan.violations.push({ file: rel, url, reason: 'names a remote asset file' });
      else scan.textMentions.set(host, (scan.textMentions.get(host) ?? 0) + 1);
    }
  }
  return scan;
}

export function printScan(dir: string, scan: BuildScan) {
  console.log(`${dir}: ${scan.files} text files scanned`);
  for (const v of scan.violations) console.log(`  REMOTE  ${v.file}: ${v.url} (${v.reason})`);
  const mentions = [...scan.textMentions].sort((a, b) => b[1] - a[1]);
  if (mentions.length) console.log(`  text mentions (not fetched): ${mentions.map(([h, n]) => `${h}×${n}`).join(', ')}`);
  console.log(scan.violations.length ? `  ${scan.violations.length} remote asset reference(s)` : '  no remote asset references');
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const dirs = process.argv.slice(2);
  let failed = false;
  for (const dir of dirs.length ? dirs : ['dist/client']) {
    const scan = await scanBuild(dir);
    printScan(dir, scan);
    failed ||= scan.violations.length > 0;
  }
  process.exit(failed ? 1 : 0);
}
