/** A field for a whole number ≥ min; with `emptyMeans`, an empty field stands for null (a default or "all"). */
import { useEffect, useState, type ReactElement } from 'react';

export interface WholeNumberInputProps {
  readonly label: string;
  readonly value: number | null;
  readonly min: number;
  readonly disabled: boolean;
  readonly testId: string;
  readonly onChange: (value: number | null) => void;
  /** What an empty field means, shown as its placeholder; without it the field cannot be left empty. */
  readonly emptyMeans?: string;
  readonly note?: string;
}

/** Text typed into the field as a number: null for empty, undefined when it is not acceptable. */
function readWhole(text: string, min: number, emptyAllowed: boolean): number | null | undefined {
  if (text.trim() === '') return emptyAllowed ? null : undefined;
  const v = Number(text);
  return Number.isInteger(v) && v >= min ? v : undefined;
}

/** The field. */
export function WholeNumberInput(props: WholeNumberInputProps): ReactElement {
  const { value, min, emptyMeans } = props;
  const [text, setText] = useState(value === null ? '' : String(value));
  useEffect(() => setText(value === null ? '' : String(value)), [value]);
  const bad = readWhole(text, min, emptyMeans !== undefined) === undefined;
  return (
    <label className="field">
      {props.label}
      <input
        type="number"
        min={min}
        step={1}
        value={text}
        placeholder={emptyMeans}
        disabled={props.disabled}
        aria-invalid={bad}
        data-testid={props.testId}
        onChange={(e) => {
          setText(e.target.value);
          const v = readWhole(e.target.value, min, emptyMeans !== undefined);
          if (v !== undefined) props.onChange(v);
        }}
      />
      {props.note !== undefined && <span className="muted small">{props.note}</span>}
    </label>
  );
}
