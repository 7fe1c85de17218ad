import { useId, useRef, useState, type DragEvent } from 'react';

function formatSize(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
  if (bytes >= 1024) return `${Math.round(bytes / 1024)} KB`;
  return `${bytes} bytes`;
}

export { formatSize };

/** Drop a file here or choose one; keyboard and screen readers use the file input behind the label. */
export function FileDrop({ file, onFile }: { file: File | null; onFile: (file: File) => void }) {
  const inputId = useId();
  const input = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const onDrop = (event: DragEvent<HTMLLabelElement>) => {
    event.preventDefault();
    setOver(false);
    const dropped = event.dataTransfer.files[0];
    if (dropped) onFile(dropped);
  };
  return (
    <label
      htmlFor={inputId}
      onDragOver={(event) => {
        event.preventDefault();
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={onDrop}
      className={`flex cursor-pointer flex-col items-center justify-center gap-1 rounded-lg border-2 border-dashed px-6 py-8 text-center transition-colors focus-within:ring-2 focus-within:ring-brass-500 ${
        over ? 'border-brass-500 bg-brass-100/60' : 'border-ink-200 bg-white hover:border-ink-300'
      }`}
    >
      <input
        ref={input}
        id={inputId}
        type="file"
        accept=".csv,.tsv,.txt,text/csv,text/plain"
        className="sr-only"
        aria-label="Choose a CSV file to import"
        onChange={(event) => {
          const chosen = event.target.files?.[0];
          if (chosen) onFile(chosen);
          event.target.value = '';
        }}
      />
      {file ? (
        <>
          <span className="font-semibold text-ink-900">{file.name}</span>
          <span className="text-sm text-ink-500">
            {formatSize(file.size)} · drop another file or click to choose a different one
          </span>
        </>
      ) : (
        <>
          <span className="font-semibold text-ink-900">Drop a CSV file here, or click to choose one</span>
          <span className="text-sm text-ink-500">UTF-8, comma, semicolon or tab separated, up to 250 MB</span>
        </>
      )}
    </label>
  );
}
