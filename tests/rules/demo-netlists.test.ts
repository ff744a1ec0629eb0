// The demo netlists (server/seed/demo-netlists/: an invented block of an invented team)
// must show a new user real findings of every rule. Each block is read as the seed
// uploads it (a file, or a folder with its includes) and checked with the built-in deck.
// The findings themselves are checked by each rule's own tests; here the reference is
// the registry: every rule it lists appears at least once.

import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ruleRegistry } from '../../rules/registry';
import { check } from '../recognition/support';

const dir = join(import.meta.dirname, '../../server/seed/demo-netlists');

function blocks(): { name: string; files: Record<string, string> }[] {
  return readdirSync(dir)
    .sort()
    .map((name) => {
      const full = join(dir, name);
      if (statSync(full).isDirectory()) {
        return { name, files: Object.fromEntries(readdirSync(full).filter((f) => f.endsWith('.sp')).map((f) => [f, readFileSync(join(full, f), 'utf8')])) };
      }
      return { name, files: { [name]: readFileSync(full, 'utf8') } };
    })
    .filter((b) => Object.keys(b.files).length > 0);
}

describe('demo netlists', () => {
  const all = blocks().map((b) => ({ ...b, findings: check(b.files) }));

  it('are the four blocks of the demo team', () => {
    expect(all.map((b) => b.name)).toEqual(['lantern-alu-domino.sp', 'lantern-regfile-6r3w', 'lantern-scan-latches.sp', 'lantern-tag-compare.sp']);
  });

  it('raise every rule of the registry at least once', () => {
    const seen = new Set(all.flatMap((b) => b.findings.map((f) => f.ruleId)));
    expect(ruleRegistry.map((r) => r.meta.id).filter((id) => !seen.has(id))).toEqual([]);
  });

  it('anchor every finding at a line of the uploaded files', () => {
    for (const b of all) {
      for (const f of b.findings) {
        const text = b.files[f.file];
        expect(text, `${f.ruleId} in ${f.file}`).toBeDefined();
        expect(f.line).toBeGreaterThan(0);
        expect(f.line).toBeLessThanOrEqual(text.split('\n').length);
      }
    }
  });
});
