import { useId, useState, type DragEvent } from 'react';
import { cx } from '@web/components/ui/cx';

/** Takes one file by drag and drop or by the file picker; the picker is a real input, so it works from the keyboard. */
export function FileDrop({ onFile, disabled = false, compact = false }: { onFile: (file: File) => void; disabled?: boolean; compact?: boolean }) {
  const [over, setOver] = useState(false);
  const hintId = useId();

  const drop = (event: DragEvent) => {
    event.preventDefault();
    setOver(false);
    const file = event.dataTransfer.files[0];
    if (file && !disabled) onFile(file);
  };

  return (
    <div
      onDragOver={(event) => {
        event.preventDefault();
        if (!disabled) setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={drop}
      className={cx(
        'flex items-center gap-3 rounded-lg border-2 border-dashed text-center transition-colors',
        compact ? 'flex-wrap px-4 py-3' : 'flex-col px-5 py-8',
        over ? 'border-accent-500 bg-accent-50' : 'border-zinc-300 bg-white',
      )}
    >
      <p className={compact ? 'text-zinc-700' : 'text-lg font-medium text-zinc-800'}>{compact ? 'Drop another file here, or' : 'Drop the CSV file here'}</p>
      {!compact && <p className="text-zinc-600">or</p>}
      <label
        className={cx(
          'inline-flex h-10 cursor-pointer items-center rounded-md bg-accent-700 px-4 font-medium text-white hover:bg-accent-800',
          'focus-within:outline-2 focus-within:outline-offset-2 focus-within:outline-accent-600',
          disabled && 'pointer-events-none opacity-60',
        )}
      >
        {compact ? 'Choose another file' : 'Choose a CSV file'}
        <input
          type="file"
          accept=".csv,.txt,text/csv"
          className="sr-only"
          aria-describedby={hintId}
          disabled={disabled}
          onChange={(event) => {
            const file = event.target.files?.[0];
            // Cleared so that choosing the same file again, once corrected, reads it again.
            event.target.value = '';
            if (file) onFile(file);
          }}
        />
      </label>
      <p id={hintId} className={cx('text-sm text-zinc-500', compact && 'sr-only')}>
        Comma, semicolon or tab separated; decimal point or decimal comma; at most 20 MB.
      </p>
    </div>
  );
}
