// The deck's rules, grouped by area: each with its switch, severity and parameters as
// typed fields (the rule's own zod schema from rules/registry, through react-hook-form),
// its rationale beside them, and a save that sends only what changed.

import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { toPointer, type DeckVersion, type PatchOperation } from '../../../shared/api/decks';
import { severitySchema, type RuleSetting, type Severity } from '../../../shared/deck';
import { ruleRegistry } from '../../../rules/registry';
import type { RuleArea, RuleModule } from '../../../rules/types';
import { Button } from '../../components/Button';
import { Checkbox } from '../../components/Field';
import { ToneBadge } from '../../design/severity';
import { SaveError, SchemaField, SelectField, useSavedValues } from './fields';
import { fieldInfo, formSchemaOf, quantityResolver, toFormValues } from './quantity';
import { usePatchVersion } from './queries';

export const AREAS: { area: RuleArea; title: string; description: string }[] = [
  { area: 'dynamic', title: 'Dynamic nodes', description: 'Precharged nodes, their keepers, charge sharing and how long they hold.' },
  { area: 'stage', title: 'Stages', description: 'Static stages: regeneration at the switching threshold and noise margins.' },
  { area: 'chain', title: 'Chains', description: 'Disturbed levels passed stage by stage through a path.' },
  { area: 'net', title: 'Nets', description: 'Clock, supply and signal nets as a whole.' },
  { area: 'device', title: 'Devices', description: 'Single transistors and passive devices.' },
];

const SEVERITY_OPTIONS = severitySchema.options.map((s) => ({ value: s, label: s[0].toUpperCase() + s.slice(1) }));

type RuleFormValues = { enabled: boolean; severity: Severity; params: Record<string, unknown> };

function ruleFormValues(rule: RuleModule, setting: RuleSetting): RuleFormValues {
  return { enabled: setting.enabled, severity: setting.severity, params: toFormValues(rule.params as z.ZodObject, setting.params) };
}

function RuleSettingsForm({ rule, setting, version, editable }: { rule: RuleModule; setting: RuleSetting; version: DeckVersion; editable: boolean }) {
  const { source, formSchema } = useMemo(() => {
    const params = rule.params as z.ZodObject;
    return {
      source: z.object({ enabled: z.boolean(), severity: severitySchema, params }),
      formSchema: z.object({ enabled: z.boolean(), severity: severitySchema, params: formSchemaOf(params) }),
    };
  }, [rule]);
  const values = useMemo(() => ruleFormValues(rule, setting), [rule, setting]);
  const form = useForm<RuleFormValues>({
    resolver: quantityResolver<RuleFormValues>(formSchema, source),
    defaultValues: values,
  });
  useSavedValues(form, values);
  const save = usePatchVersion(version);
  const { errors, dirtyFields, isDirty } = form.formState;
  const shape = rule.params.shape as Record<string, z.ZodType>;
  const base = ['rules', rule.meta.id];
  const headingId = `rule-${rule.meta.id}`;

  const submit = form.handleSubmit((parsed) => {
    const ops: PatchOperation[] = [];
    if (dirtyFields.enabled) ops.push({ op: 'replace', path: toPointer([...base, 'enabled']), value: parsed.enabled });
    if (dirtyFields.severity) ops.push({ op: 'replace', path: toPointer([...base, 'severity']), value: parsed.severity });
    for (const name of Object.keys(shape)) {
      // `add` sets a member whether or not the stored setting lists it yet (RFC 6902 §4.1).
      if ((dirtyFields.params as Record<string, unknown> | undefined)?.[name]) ops.push({ op: 'add', path: toPointer([...base, 'params', name]), value: parsed.params[name] });
    }
    if (ops.length) save.mutate(ops, { onSuccess: (saved) => form.reset(ruleFormValues(rule, saved.content.rules[rule.meta.id])) });
  });

  return (
    <section aria-labelledby={headingId} className="rounded-lg border border-ink-200 bg-white p-4 shadow-xs">
      <form noValidate onSubmit={submit}>
        <fieldset disabled={!editable} className="grid gap-4 lg:grid-cols-[minmax(0,1.2fr)_minmax(0,1fr)]">
          <div className="min-w-0 space-y-3">
            <div className="flex flex-wrap items-start justify-between gap-3">
              <div className="min-w-0">
                <h3 id={headingId} className="text-sm font-semibold text-ink-900">
                  {rule.meta.title}
                </h3>
                <p className="font-mono text-xs text-ink-500">{rule.meta.id}</p>
              </div>
              {!editable && <ToneBadge tone={setting.enabled ? setting.severity : 'waived'} label={setting.enabled ? undefined : 'Off'} />}
            </div>
            <div className="flex flex-wrap items-end gap-4">
              <Checkbox label="Runs in this deck" {...form.register('enabled')} />
              <SelectField label="Severity" options={SEVERITY_OPTIONS} className="w-36" {...form.register('severity')} />
            </div>
            {Object.keys(shape).length > 0 ? (
              <div className="grid gap-3 sm:grid-cols-2">
                {Object.entries(shape).map(([name, field]) => (
                  <SchemaField
                    key={name}
                    info={fieldInfo(field)}
                    registration={form.register(`params.${name}` as const)}
                    error={(errors.params as Record<string, { message?: string; type?: string }> | undefined)?.[name] as never}
                  />
                ))}
              </div>
            ) : (
              <p className="text-sm text-ink-500">This rule has no parameters.</p>
            )}
          </div>
          <div className="space-y-2 text-sm leading-6 text-ink-700 lg:border-l lg:border-ink-100 lg:pl-4">
            <p>
              <span className="font-medium text-ink-900">Why: </span>
              {rule.meta.rationale}
            </p>
            <p>
              <span className="font-medium text-ink-900">Usual fix: </span>
              {rule.meta.fix}
            </p>
            <p className="text-xs text-ink-500">Keepwell’s default severity: {rule.meta.defaultSeverity}.</p>
          </div>
        </fieldset>
        {save.isError && <SaveError error={save.error} title={`${rule.meta.title}: not saved`} version={version} />}
        {editable && isDirty && (
          <div className="mt-3 flex justify-end gap-2">
            <Button size="sm" onClick={() => form.reset(values)}>
              Undo changes
            </Button>
            <Button size="sm" type="submit" variant="primary" busy={save.isPending}>
              Save {rule.meta.title.toLowerCase()}
            </Button>
          </div>
        )}
      </form>
    </section>
  );
}

export function RulesTable({ version, editable }: { version: DeckVersion; editable: boolean }) {
  const rules = version.content.rules;
  return (
    <div className="space-y-8">
      {AREAS.map(({ area, title, description }) => {
        const inArea = ruleRegistry.filter((r) => r.meta.area === area && rules[r.meta.id]);
        return (
          <section key={area} aria-labelledby={`area-${area}`}>
            <div className="mb-3">
              <h2 id={`area-${area}`} className="text-base font-semibold text-ink-900">
                {title}
              </h2>
              <p className="text-sm text-ink-500">{description}</p>
            </div>
            {inArea.length === 0 ? (
              <p className="rounded-lg border border-dashed border-ink-300 px-4 py-3 text-sm text-ink-500">This deck has no rules in this area.</p>
            ) : (
              <div className="space-y-3">
                {inArea.map((rule) => (
                  <RuleSettingsForm key={rule.meta.id} rule={rule} setting={rules[rule.meta.id]} version={version} editable={editable} />
                ))}
              </div>
            )}
          </section>
        );
      })}
    </div>
  );
}
