// Diffs of two deck versions, the JSON Patch applier behind draft edits, and the
// rule catalogue's parameter schemas.
//
// Patch semantics are checked against the worked examples of RFC 6902 Appendix A and
// the pointer escapes of RFC 6901 §3–4 (examples reproduced from memory of the RFCs);
// the catalogue's schemas against JSON Schema draft 2020-12 through ajv.

import Ajv2020 from 'ajv/dist/2020';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { deckDiffSchema, deckVersionSchema, ruleCatalogueSchema, toPointer } from '../../shared/api/decks';
import type { Deck } from '../../shared/deck';
import { defaultDeck } from '../../rules/default-deck';
import { ruleRegistry } from '../../rules/registry';
import { diffDeckContents } from '../../server/services/decks-diff';
import { applyPatch, parsePointer, PatchError } from '../../server/services/decks-patch';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { makeDeck } from './decks-fixtures';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

describe('diff of two versions', () => {
  it('lists exactly the changed fields, section by section', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { published } = await makeDeck(team.id);
    const draft = deckVersionSchema.parse((await owner.agent.post(`/api/decks/${published.deckId}/drafts`).send({}).expect(201)).body);
    const base = draft.content;
    const ffHot = base.corners.findIndex((c) => c.name === 'ff-hot');
    const ssHot = base.corners.findIndex((c) => c.name === 'ss-hot');
    const changes = [
      { op: 'replace', path: '/rules/stage.non-regenerative/enabled', value: false },
      { op: 'replace', path: '/rules/stage.noise-margin/severity', value: 'error' },
      { op: 'replace', path: '/rules/stage.noise-margin/params/minFraction', value: 0.15 },
      { op: 'replace', path: '/rules/device.implausible-size/params/maxWidth', value: 2e-4 },
      { op: 'replace', path: `/corners/${ffHot}/vdd`, value: 2.8 },
      { op: 'replace', path: `/corners/${ffHot}/nmos/vt0`, value: 0.36 },
      { op: 'remove', path: `/corners/${ssHot}` },
      { op: 'add', path: '/corners/-', value: { ...base.corners[0], name: 'sf-cold', temperatureC: -40 } },
      { op: 'add', path: '/clocks/roots/-', value: { pattern: 'pclk*', phase: 'p1', polarity: 'inverted' } },
      { op: 'replace', path: '/clocks/roots/0/polarity', value: 'inverted' },
      { op: 'add', path: '/clocks/invertedSuffixes/-', value: '_x' },
      { op: 'remove', path: '/supplies/power/4' }, // vpb
      { op: 'add', path: '/supplies/ground/-', value: 'agnd*' },
      { op: 'add', path: '/deviceMap/0', value: { pattern: 'hvt_*', kind: 'ignore' } },
      // After the insertion at the front, index 3 is the third built-in entry, *nmos*.
      { op: 'replace', path: '/deviceMap/3/kind', value: 'ignore' },
      { op: 'replace', path: '/scale', value: 1e-6 },
      { op: 'replace', path: '/slowestClockPeriod', value: 2e-7 },
    ];
    const edited = deckVersionSchema.parse(
      (await owner.agent.patch(`/api/decks/${draft.deckId}/versions/${draft.id}`).send({ lockVersion: draft.lockVersion, changes }).expect(200)).body,
    );
    await owner.agent.post(`/api/decks/${draft.deckId}/versions/${draft.id}/publish`).send({ lockVersion: edited.lockVersion, changeNote: 'diff test' }).expect(200);

    const diff = deckDiffSchema.parse((await owner.agent.get(`/api/decks/diff?from=${published.id}&to=${draft.id}`).expect(200)).body);
    expect(diff.from).toMatchObject({ id: published.id, version: 1 });
    expect(diff.to).toMatchObject({ id: draft.id, version: 2 });
    expect(diff.rules).toEqual({
      added: [],
      removed: [],
      enabled: [{ ruleId: 'stage.non-regenerative', from: true, to: false }],
      regraded: [{ ruleId: 'stage.noise-margin', from: 'warning', to: 'error' }],
      params: [
        { ruleId: 'device.implausible-size', param: 'maxWidth', from: 1e-3, to: 2e-4, unit: 'm', label: 'Largest plausible width' },
        { ruleId: 'stage.noise-margin', param: 'minFraction', from: 0.1, to: 0.15, unit: 'ratio', label: 'Smallest noise margin as a fraction of VDD' },
      ],
    });
    expect(diff.corners).toEqual({
      added: ['sf-cold'],
      removed: ['ss-hot'],
      changed: [
        { corner: 'ff-hot', field: 'vdd', from: 2.75, to: 2.8, unit: 'V' },
        { corner: 'ff-hot', field: 'nmos.vt0', from: base.corners[ffHot].nmos.vt0, to: 0.36, unit: 'V' },
      ],
    });
    expect(diff.clocks).toEqual({
      added: [{ pattern: 'pclk*', phase: 'p1', polarity: 'inverted' }],
      removed: [],
      changed: [{ pattern: 'clk*', field: 'polarity', from: 'true', to: 'inverted' }],
      invertedSuffixesAdded: ['_x'],
      invertedSuffixesRemoved: [],
    });
    expect(diff.supplies).toEqual({ powerAdded: [], powerRemoved: ['vpb'], groundAdded: ['agnd*'], groundRemoved: [] });
    expect(diff.deviceMap).toEqual({
      added: [{ pattern: 'hvt_*', kind: 'ignore' }],
      removed: [],
      changed: [{ pattern: '*nmos*', from: 'nmos', to: 'ignore' }],
      reordered: false,
    });
    expect(diff.settings).toEqual([
      { field: 'scale', from: 1, to: 1e-6, unit: '' },
      { field: 'slowestClockPeriod', from: 100e-9, to: 2e-7, unit: 's' },
    ]);
    expect(diff.paths).toHaveLength(17);

    // Reversed, additions become removals and every change swaps its ends.
    const back = deckDiffSchema.parse((await owner.agent.get(`/api/decks/diff?from=${draft.id}&to=${published.id}`).expect(200)).body);
    expect(back.corners.added).toEqual(['ss-hot']);
    expect(back.corners.removed).toEqual(['sf-cold']);
    expect(back.rules.params.map((p) => [p.from, p.to])).toEqual(diff.rules.params.map((p) => [p.to, p.from]));
    expect(back.supplies).toEqual({ powerAdded: ['vpb'], powerRemoved: [], groundAdded: [], groundRemoved: ['agnd*'] });
    // A version compared with itself has no changes at all.
    const self = deckDiffSchema.parse((await owner.agent.get(`/api/decks/diff?from=${draft.id}&to=${draft.id}`).expect(200)).body);
    expect(self.paths).toEqual([]);
  });

  it('names added and removed rules and a reordered device map', () => {
    const a = defaultDeck();
    const b: Deck = structuredClone(a);
    delete b.rules['stage.noise-margin'];
    b.rules['dynamic.some-future-rule'] = { enabled: true, severity: 'info', params: {} };
    b.deviceMap = [b.deviceMap[1], b.deviceMap[0], ...b.deviceMap.slice(2)];
    const diff = diffDeckContents(a, b);
    expect(diff.rules.added).toEqual([{ ruleId: 'dynamic.some-future-rule', enabled: true, severity: 'info' }]);
    expect(diff.rules.removed).toEqual([{ ruleId: 'stage.noise-margin', enabled: true, severity: 'warning' }]);
    expect(diff.deviceMap).toMatchObject({ added: [], removed: [], changed: [], reordered: true });
    expect(diff.paths).toEqual(['rules.stage.noise-margin', 'rules.dynamic.some-future-rule', 'deviceMap.order']);
  });
});

describe('JSON Patch (RFC 6902) and JSON pointers (RFC 6901)', () => {
  it('follows the worked examples of RFC 6902 Appendix A', () => {
    // A.1 Adding an Object Member
    expect(applyPatch({ foo: 'bar' }, [{ op: 'add', path: '/baz', value: 'qux' }])).toEqual({ baz: 'qux', foo: 'bar' });
    // A.2 Adding an Array Element
    expect(applyPatch({ foo: ['bar', 'baz'] }, [{ op: 'add', path: '/foo/1', value: 'qux' }])).toEqual({ foo: ['bar', 'qux', 'baz'] });
    // A.3 Removing an Object Member
    expect(applyPatch({ baz: 'qux', foo: 'bar' }, [{ op: 'remove', path: '/baz' }])).toEqual({ foo: 'bar' });
    // A.4 Removing an Array Element
    expect(applyPatch({ foo: ['bar', 'qux', 'baz'] }, [{ op: 'remove', path: '/foo/1' }])).toEqual({ foo: ['bar', 'baz'] });
    // A.5 Replacing a Value
    expect(applyPatch({ baz: 'qux', foo: 'bar' }, [{ op: 'replace', path: '/baz', value: 'boo' }])).toEqual({ baz: 'boo', foo: 'bar' });
    // A.10 Adding a Nested Member Object
    expect(applyPatch({ foo: 'bar' }, [{ op: 'add', path: '/child', value: { grandchild: {} } }])).toEqual({ foo: 'bar', child: { grandchild: {} } });
    // A.12 Adding to a Nonexistent Target: an error
    expect(() => applyPatch({ foo: 'bar' }, [{ op: 'add', path: '/baz/bat', value: 'qux' }])).toThrow(PatchError);
    // A.16 Adding an Array Value: "-" appends the array as one element
    expect(applyPatch({ foo: ['bar'] }, [{ op: 'add', path: '/foo/-', value: ['abc', 'def'] }])).toEqual({ foo: ['bar', ['abc', 'def']] });
  });

  it('refuses what RFC 6902 §4 calls errors, and leaves the input untouched', () => {
    const doc = { list: [1, 2], obj: { a: 1 } };
    expect(() => applyPatch(doc, [{ op: 'replace', path: '/obj/b', value: 2 }])).toThrow(/nothing at "b"/); // §4.3 target must exist
    expect(() => applyPatch(doc, [{ op: 'remove', path: '/list/2' }])).toThrow(/past the end/); // §4.2
    expect(() => applyPatch(doc, [{ op: 'add', path: '/list/3', value: 0 }])).toThrow(/past the end/); // §4.1 index > size
    expect(() => applyPatch(doc, [{ op: 'add', path: '/list/01', value: 0 }])).toThrow(/not an array index/); // RFC 6901 §4 leading zero
    expect(() => applyPatch(doc, [{ op: 'add', path: '/obj/__proto__', value: { polluted: true } }])).toThrow(PatchError);
    // §5: an error in any operation applies none of them.
    expect(() => applyPatch(doc, [{ op: 'replace', path: '/obj/a', value: 9 }, { op: 'remove', path: '/missing' }])).toThrow();
    expect(doc).toEqual({ list: [1, 2], obj: { a: 1 } });
  });

  it('unescapes ~1 and ~0 as RFC 6901 §4 says, and escapes them back', () => {
    expect(parsePointer('/a~1b')).toEqual(['a/b']);
    expect(parsePointer('/m~0n')).toEqual(['m~n']);
    // §4: "~01" is "~1" once decoded, not "/".
    expect(parsePointer('/~01')).toEqual(['~1']);
    expect(toPointer(['rules', 'stage.noise-margin', 'params', 'a/b~c'])).toBe('/rules/stage.noise-margin/params/a~1b~0c');
    expect(parsePointer(toPointer(['x/y', '~', '0']))).toEqual(['x/y', '~', '0']);
  });
});

describe('rule catalogue', () => {
  it("lists every rule with its parameters as JSON Schema that accepts the rule's defaults and refuses values out of range", async () => {
    const team = await createTeam();
    const reviewer = await signedInAs(env, team, ['reviewer']);
    const catalogue = ruleCatalogueSchema.parse((await reviewer.agent.get('/api/rules').expect(200)).body);
    expect(catalogue.items.map((r) => r.id)).toEqual(ruleRegistry.map((r) => r.meta.id));
    const ajv = new Ajv2020({ strict: false });
    for (const entry of catalogue.items) {
      const rule = ruleRegistry.find((r) => r.meta.id === entry.id)!;
      expect(entry).toMatchObject({ title: rule.meta.title, area: rule.meta.area, defaultSeverity: rule.meta.defaultSeverity });
      expect(entry.params.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
      const validate = ajv.compile(entry.params);
      const defaults = rule.params.parse({}) as Record<string, unknown>;
      expect(validate(defaults), JSON.stringify(validate.errors)).toBe(true);
      const properties = entry.params.properties as Record<string, { unit?: string; label?: string; maximum?: number; minimum?: number; default?: unknown }>;
      for (const [name, field] of Object.entries(rule.params.shape as Record<string, z.ZodType>)) {
        const meta = field.meta() as { unit: string; label: string };
        expect(properties[name]).toMatchObject({ unit: meta.unit, label: meta.label, default: defaults[name] });
        if (typeof properties[name].maximum === 'number') {
          expect(validate({ ...defaults, [name]: properties[name].maximum! * 2 + 1 })).toBe(false);
          // The rule's own zod schema agrees with its JSON Schema on the same value.
          expect(rule.params.safeParse({ ...defaults, [name]: properties[name].maximum! * 2 + 1 }).success).toBe(false);
        }
      }
    }
  });
});
