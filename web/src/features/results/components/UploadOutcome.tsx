import { Link } from 'react-router-dom';
import { uploadLinks } from '../api/uploads';
import type { UploadOutcome as Outcome } from '@web/lib/import-outcome';
import { lotPath } from '@web/lib/lots';
import { RowErrorList } from './RowErrorList';
import { DownloadLink } from './DownloadLink';
import { Alert } from '@web/components/ui/Alert';
import { formatCount } from '@web/lib/format';

const link = 'font-medium underline underline-offset-2';

/** What the server did with the file, in its own words, and where to go next. */
export function UploadOutcome({ outcome, fileName, lots }: { outcome: Outcome; fileName: string; lots: string[] }) {
  if (outcome.kind === 'imported') {
    return (
      <Alert tone="success">
        <p className="font-semibold">
          Imported: <span className="font-mono">{formatCount(outcome.rowsImported)}</span> result{outcome.rowsImported === 1 ? '' : 's'} from {fileName} as upload{' '}
          <span className="font-mono">{outcome.id}</span>.
        </p>
        <p className="mt-1">
          {lots.length > 0 && (
            <>
              Lot{lots.length === 1 ? '' : 's'}{' '}
              {lots.slice(0, 5).map((lot, i) => (
                <span key={lot}>
                  {i > 0 && ', '}
                  <Link to={lotPath(lot)} className={link}>
                    {lot}
                  </Link>
                </span>
              ))}
              {lots.length > 5 && ` and ${formatCount(lots.length - 5)} more`}.{' '}
            </>
          )}
          <Link to="/results/history" className={link}>
            See the upload history
          </Link>
        </p>
      </Alert>
    );
  }
  if (outcome.kind === 'duplicate') {
    return (
      <Alert tone="error">
        <p className="font-semibold">
          Not imported: this file was imported before, as upload <span className="font-mono">{outcome.uploadId}</span>. Nothing was stored twice.
        </p>
        <p className="mt-1">
          If results in it were wrong, correct them in the file and upload the corrected file; a quality manager can void the earlier upload.{' '}
          <Link to="/results/history" className={link}>
            See the upload history
          </Link>
        </p>
      </Alert>
    );
  }
  return (
    <div className="space-y-3">
      <Alert tone="error">
        <p className="font-semibold">{outcome.message}.</p>
        <p className="mt-1">
          The server checked the file against what is already stored and found the rows below. Correct them in the file and upload it again.
          {outcome.id !== null && (
            <>
              {' '}
              <DownloadLink href={uploadLinks.errorReport(outcome.id)} className="text-red-900">
                Download the error report (CSV)
              </DownloadLink>
            </>
          )}
        </p>
      </Alert>
      <RowErrorList errors={outcome.errors} caption="Rows the server could not take" />
    </div>
  );
}
