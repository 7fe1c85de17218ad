import type { DigestRecord } from '../../../../shared/schemas/digests.schema';

/** The PDF in the browser's own viewer, served from Ballast (same origin), with a download link. */
export function DigestPreview({ digest, title }: { digest: DigestRecord; title: string }) {
  return (
    <section
      aria-label={`Preview of ${title}`}
      className="flex min-h-[70vh] flex-col rounded-lg border border-ink-100 bg-white"
    >
      <div className="flex flex-wrap items-center justify-between gap-2 border-b border-ink-100 px-4 py-2 text-sm">
        <span className="min-w-0 truncate font-semibold text-ink-900">{title}</span>
        <a
          className="rounded-md bg-ink-900 px-3 py-1.5 font-semibold text-paper hover:bg-ink-700"
          href={digest.downloadUrl}
          download={digest.fileName}
        >
          Download PDF
        </a>
      </div>
      <iframe title={`${title} (PDF)`} src={digest.previewUrl} className="min-h-[70vh] w-full flex-1" />
    </section>
  );
}
