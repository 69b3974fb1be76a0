/**
 * A drop area with a file picker and a folder picker. Problems with what was dropped are shown
 * right here, next to it; the caller keeps its previous data when a load fails.
 */
import { useEffect, useRef, useState, type ReactElement, type ReactNode } from 'react';
import type { NamedBytes } from '../../core/types.ts';
import { filesFromDrop, filesFromList } from '../lib/files.ts';

export interface DropZoneProps {
  readonly testId: string;
  readonly title: string;
  readonly hint: ReactNode;
  readonly accept: string;
  readonly busy: boolean;
  readonly error: string | null;
  readonly disabled?: boolean;
  readonly onFiles: (files: NamedBytes[]) => void;
}

/** The drop zone. */
export function DropZone(props: DropZoneProps): ReactElement {
  const [over, setOver] = useState(false);
  const [readError, setReadError] = useState<string | null>(null);
  const folderInput = useRef<HTMLInputElement>(null);
  useEffect(() => {
    // Not in React's typings: lets the picker choose a whole folder (files keep their paths).
    if (folderInput.current) folderInput.current.webkitdirectory = true;
  }, []);
  const take = (read: Promise<NamedBytes[]>): void => {
    setReadError(null);
    read.then(
      (files) => (files.length === 0 ? setReadError('Nothing was dropped that could be read as a file.') : props.onFiles(files)),
      (err: unknown) => setReadError(`The files could not be read: ${err instanceof Error ? err.message : String(err)}`),
    );
  };
  const error = readError ?? props.error;
  return (
    <section
      className={`drop ${over ? 'drop-over' : ''} ${props.busy ? 'drop-busy' : ''}`}
      data-testid={props.testId}
      onDragOver={(e) => {
        e.preventDefault();
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={(e) => {
        e.preventDefault();
        setOver(false);
        if (!props.disabled) take(filesFromDrop(e.dataTransfer));
      }}
    >
      <h3>{props.title}</h3>
      <div className="drop-hint">{props.hint}</div>
      <div className="drop-actions">
        <label className="button">
          Choose files…
          <input
            type="file"
            multiple
            accept={props.accept}
            disabled={props.disabled}
            data-testid={`${props.testId}-files`}
            onChange={(e) => {
              if (e.target.files) take(filesFromList(e.target.files));
              e.target.value = '';
            }}
          />
        </label>
        <label className="button">
          Choose a folder…
          <input
            ref={folderInput}
            type="file"
            disabled={props.disabled}
            data-testid={`${props.testId}-folder`}
            onChange={(e) => {
              if (e.target.files) take(filesFromList(e.target.files));
              e.target.value = '';
            }}
          />
        </label>
        {props.busy && <span className="muted">reading…</span>}
      </div>
      {error !== null && (
        <p className="problem" role="alert" data-testid={`${props.testId}-error`}>
          {error}
        </p>
      )}
    </section>
  );
}
