/** The "search" picker shared by the galleries: one option per search that ran. */
import type { ReactElement } from 'react';
import type { AttackId } from '../../core/attacks/types.ts';
import { attackLabel } from '../lib/figure.ts';

/** A labelled select over `attacks`; `value` null shows nothing chosen. */
export function AttackSelect(props: { readonly attacks: readonly AttackId[]; readonly value: AttackId | null; readonly onChange: (id: AttackId) => void }): ReactElement {
  return (
    <label className="field inline">
      search
      <select value={props.value ?? ''} onChange={(e) => props.onChange(e.target.value as AttackId)}>
        {props.attacks.map((a) => (
          <option key={a} value={a}>
            {attackLabel(a)}
          </option>
        ))}
      </select>
    </label>
  );
}
