/**
 * The search settings form, generated from the chosen searches' metadata: one field per option
 * they declare, shared by all of them (as on the command line), each search's default until set.
 */
import { useEffect, useState, type ReactElement } from 'react';
import type { TargetMode } from '../../core/attacks/types.ts';
import { useWorkspace } from '../store/workspace.ts';
import { optionUses, shownOption, type OptionUse } from '../lib/plan.ts';
import { fieldSpec, readNumber, type FieldSpec } from '../lib/optionFields.ts';

interface FieldProps {
  readonly use: OptionUse;
  readonly spec: FieldSpec;
  readonly value: unknown;
  readonly disabled: boolean;
  readonly set: (value: unknown) => void;
}

function defaultsNote(use: OptionUse): string {
  const users = use.users.map((u) => u.label).join(', ');
  const first = JSON.stringify(use.users[0]?.fallback);
  if (use.users.every((u) => JSON.stringify(u.fallback) === first)) return `used by ${users}`;
  return `used by ${users}; defaults ${use.users.map((u) => `${u.label} ${JSON.stringify(u.fallback)}`).join(', ')}`;
}

function NumberInput({ spec, value, disabled, set, placeholder }: Omit<FieldProps, 'use'> & { placeholder: string }): ReactElement {
  const [text, setText] = useState(typeof value === 'number' ? String(value) : '');
  useEffect(() => setText(typeof value === 'number' ? String(value) : ''), [value]);
  const bad = text !== '' && readNumber(text, spec) === null;
  return (
    <input
      type="number"
      value={text}
      placeholder={placeholder}
      min={spec.min}
      step={spec.kind === 'integer' ? 1 : 'any'}
      disabled={disabled}
      aria-invalid={bad}
      onChange={(e) => {
        setText(e.target.value);
        const v = readNumber(e.target.value, spec);
        if (v !== null) set(v);
      }}
    />
  );
}

function TargetInput({ value, disabled, set }: Omit<FieldProps, 'use' | 'spec'>): ReactElement {
  const classNames = useWorkspace((s) => s.samples.value?.classNames ?? []);
  const numClasses = useWorkspace((s) => s.model.value?.description.numClasses ?? classNames.length);
  const target = (value as TargetMode | undefined) ?? { kind: 'untargeted' };
  return (
    <span className="row">
      <select value={target.kind} disabled={disabled} onChange={(e) => set(e.target.value === 'class' ? { kind: 'class', classIndex: 0 } : { kind: e.target.value })}>
        <option value="untargeted">any wrong class</option>
        <option value="least-likely">each image's least likely class</option>
        <option value="class">one chosen class</option>
      </select>
      {target.kind === 'class' && (
        <select value={target.classIndex} disabled={disabled} onChange={(e) => set({ kind: 'class', classIndex: Number(e.target.value) })}>
          {Array.from({ length: numClasses }, (_, i) => (
            <option key={i} value={i}>
              {i}: {classNames[i] ?? `class ${i}`}
            </option>
          ))}
        </select>
      )}
    </span>
  );
}

function OptionField(props: FieldProps): ReactElement {
  const { use, spec, value, disabled, set } = props;
  const placeholder = use.users.map((u) => `${u.label} ${String(u.fallback)}`).join(' · ');
  let control: ReactElement;
  switch (spec.kind) {
    case 'integer':
    case 'number':
      control = <NumberInput spec={spec} value={value} disabled={disabled} set={set} placeholder={placeholder} />;
      break;
    case 'number-or-auto':
      control = (
        <span className="row">
          <label className="choice">
            <input type="checkbox" checked={value === null} disabled={disabled} onChange={(e) => set(e.target.checked ? null : 0.1)} /> {spec.autoLabel}
          </label>
          {value !== null && <NumberInput spec={spec} value={value} disabled={disabled} set={set} placeholder={placeholder} />}
        </span>
      );
      break;
    case 'boolean':
      control = <input type="checkbox" checked={value === true} disabled={disabled} onChange={(e) => set(e.target.checked)} />;
      break;
    case 'loss':
      control = (
        <select value={typeof value === 'string' ? value : 'ce'} disabled={disabled} onChange={(e) => set(e.target.value)}>
          <option value="ce">cross-entropy</option>
          <option value="margin">margin: best other class minus the true class</option>
        </select>
      );
      break;
    case 'target':
      control = <TargetInput value={value} disabled={disabled} set={set} />;
      break;
    case 'unsupported':
      control = <span className="muted">{JSON.stringify(value)}</span>;
      break;
  }
  return (
    <div className="field option" data-option={use.key}>
      <label>{spec.label}</label>
      {control}
      <span className="muted small">
        {defaultsNote(use)}
        {spec.help ? `; ${spec.help}` : ''}
      </span>
    </div>
  );
}

/** The form. */
export function SearchOptions(): ReactElement {
  const plan = useWorkspace((s) => s.plan);
  const update = useWorkspace((s) => s.updatePlan);
  const running = useWorkspace((s) => s.run.status === 'running');
  const uses = optionUses(plan.attacks);
  const setOption = (key: string, value: unknown): void => update({ options: { ...plan.options, [key]: value } });
  const customised = Object.keys(plan.options).length > 0;
  return (
    <section className="panel form">
      <div className="row">
        <h3>Search settings</h3>
        <button type="button" disabled={!customised || running} onClick={() => update({ options: {} })}>
          Back to each search's defaults
        </button>
      </div>
      {uses.length === 0 && <p className="muted">The chosen searches have no settings.</p>}
      <div className="options">
        {uses.map((use) => (
          <OptionField key={use.key} use={use} spec={fieldSpec(use.key, use.users[0]?.fallback)} value={shownOption(plan, use)} disabled={running} set={(v) => setOption(use.key, v)} />
        ))}
      </div>
    </section>
  );
}
