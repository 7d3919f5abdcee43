import { useRef } from 'react';
import { FormError } from '../../../components/form-field';
import { Empty, QueryState } from '../../../components/states';
import { formErrors } from '../../../lib/form-errors';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatDateTime } from '../../../lib/time-format';
import { type Visit, attachmentUrl, thumbnailUrl, useVisits } from '../api/get-visits';
import { useUploadAttachment } from '../api/upload-attachment';
import { VisitForm } from './visit-form';

/** Service visits, newest first, with notes, photos and PDFs; staff may add and upload. */
export function VisitList(props: { siteId: string; canEdit: boolean }) {
  const visits = useVisits(props.siteId);
  return (
    <section aria-label="Service visits" className="space-y-3">
      {props.canEdit && <VisitForm siteId={props.siteId} />}
      <QueryState query={visits} what="The visits could not be loaded.">
        {(list) =>
          list.length === 0 ? (
            <Empty title="No visits recorded yet" />
          ) : (
            <ul className="space-y-2">
              {list.map((v) => (
                <VisitItem key={v.id} visit={v} canEdit={props.canEdit} />
              ))}
            </ul>
          )
        }
      </QueryState>
    </section>
  );
}

function VisitItem({ visit, canEdit }: { visit: Visit; canEdit: boolean }) {
  const { timeZone } = usePersonSettings();
  const upload = useUploadAttachment(visit.siteId, visit.id);
  const input = useRef<HTMLInputElement>(null);
  return (
    <li className="wk-card p-3" data-visit-id={visit.id}>
      <div className="flex flex-wrap justify-between gap-2">
        <p className="font-semibold text-wk-ink-strong">{visit.summary}</p>
        <p className="text-label text-wk-ink-soft">
          {formatDateTime(visit.visitedAt, timeZone)}
          {visit.technicianName && ` · ${visit.technicianName}`}
        </p>
      </div>
      {visit.findings && (
        <p className="mt-1 whitespace-pre-line text-wk-ink">
          <span className="wk-label mr-1">Found</span>
          {visit.findings}
        </p>
      )}
      {visit.partsReplaced && (
        <p className="mt-1 whitespace-pre-line text-wk-ink">
          <span className="wk-label mr-1">Replaced</span>
          {visit.partsReplaced}
        </p>
      )}
      {visit.attachments.length > 0 && (
        <ul className="mt-2 flex flex-wrap gap-2" aria-label="Attachments">
          {visit.attachments.map((a) => (
            <li key={a.id}>
              <a
                href={attachmentUrl(visit.siteId, a.id)}
                target="_blank"
                rel="noreferrer"
                className="block rounded-lg border border-wk-line p-1 hover:border-wk-brand"
                title={a.fileName}
              >
                {a.hasThumbnail ? (
                  <img
                    src={thumbnailUrl(visit.siteId, a.id)}
                    alt={`Photo: ${a.fileName}`}
                    className="h-20 w-20 rounded object-cover"
                    loading="lazy"
                  />
                ) : (
                  <span className="flex h-20 w-20 flex-col items-center justify-center rounded bg-wk-sunken text-label text-wk-ink-soft">
                    <span className="font-mono font-semibold">PDF</span>
                    <span className="w-full truncate px-1 text-center">{a.fileName}</span>
                  </span>
                )}
              </a>
            </li>
          ))}
        </ul>
      )}
      {canEdit && (
        <div className="mt-2">
          <label className="wk-button-quiet cursor-pointer">
            Add photo or PDF
            <input
              ref={input}
              type="file"
              accept="image/jpeg,image/png,image/webp,application/pdf"
              className="sr-only"
              onChange={(e) => {
                const file = e.target.files?.[0];
                if (file) upload.mutate(file);
                e.target.value = '';
              }}
            />
          </label>
          {upload.progress !== null && (
            <div className="mt-2" aria-live="polite">
              <progress
                className="h-2 w-48"
                max={1}
                value={upload.progress}
                aria-label="Upload progress"
              />
              <span className="ml-2 font-mono text-label">
                {Math.round(upload.progress * 100)} %
              </span>
            </div>
          )}
          <FormError message={formErrors(upload.error).message} />
        </div>
      )}
    </li>
  );
}
