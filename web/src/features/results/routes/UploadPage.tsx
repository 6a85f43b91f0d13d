import { useMemo, useState } from 'react';
import { decodeText, detectDialect, missingColumns, notAResultsFile, parseCsv, type CsvDialect } from '@shared/ingest';
import { useEntryCatalogue, type EntryCatalogue } from '@web/lib/catalogue';
import { uploadLinks, useColumnMappings, useUploadResults, type SavedMapping } from '../api/uploads';
import { ingestCatalogue } from '../lib/catalogue';
import { checkFile } from '../lib/check-file';
import { draftFromMapping, hasCanonicalHeaders, mappingFromDraft, suggestDraft, type MappingDraft } from '../lib/mapping';
import { FileDrop } from '../components/FileDrop';
import { DialectControls } from '../components/DialectControls';
import { PreviewTable, PREVIEW_ROWS } from '../components/PreviewTable';
import { MappingEditor } from '../components/MappingEditor';
import { RowErrorList } from '../components/RowErrorList';
import { UploadOutcome } from '../components/UploadOutcome';
import { DownloadLink } from '../components/DownloadLink';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { formatCount } from '@web/lib/format';

/** The server refuses larger files (api/routes/uploads: MAX_UPLOAD_BYTES); saying so before reading spares the wait. */
const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;

interface Source {
  file: File;
  text: string;
  detected: CsvDialect;
}

interface MappingState {
  draft: MappingDraft;
  /** The saved mapping the draft came from, until it is edited. */
  savedName?: string;
}

/** The first saved mapping that fits the file's headers, else a guess from the headers themselves. */
function initialMapping(headers: string[], saved: SavedMapping[], codes: string[]): MappingState {
  const fitting = saved.find((m) => missingColumns(headers, m.mapping).length === 0);
  if (fitting) return { draft: draftFromMapping(fitting.mapping), savedName: fitting.name };
  const wide = suggestDraft('wide', headers, codes);
  return { draft: Object.keys(wide.characteristicColumns).length > 0 ? wide : suggestDraft('long', headers, codes) };
}

const plural = (n: number, word: string) => `${formatCount(n)} ${word}${n === 1 ? '' : 's'}`;

/** The import button says what it will store. */
function importLabel(blocked: boolean, wide: boolean, results: number, rows: number): string {
  if (blocked) return 'Correct the file first';
  if (wide) return `Import ${plural(results, 'result')} from ${plural(rows, 'row')}`;
  return rows === 1 ? 'Import 1 row' : `Import all ${formatCount(rows)} rows`;
}

const formatSize = (bytes: number) => (bytes < 1024 ? `${bytes} B` : bytes < 1024 * 1024 ? `${(bytes / 1024).toFixed(1)} kB` : `${(bytes / 1024 / 1024).toFixed(1)} MB`);

export default function UploadPage() {
  const catalogue = useEntryCatalogue();
  return (
    <>
      <PageHeader
        title="Upload results"
        description="Import a shift's results from a CSV file exported from a lab instrument or a spreadsheet. A file is imported whole or not at all: if one row cannot be taken, nothing is stored."
        actions={<DownloadLink href={uploadLinks.template}>Download the CSV template</DownloadLink>}
      />
      {catalogue.error ? (
        <ErrorState title="Could not load the products and characteristics" error={catalogue.error} onRetry={catalogue.retry} />
      ) : !catalogue.data ? (
        <Loading label="Loading products and characteristics…" />
      ) : (
        <UploadSteps catalogue={catalogue.data} />
      )}
    </>
  );
}

function UploadSteps({ catalogue }: { catalogue: EntryCatalogue }) {
  const savedMappings = useColumnMappings();
  const upload = useUploadResults();
  const [source, setSource] = useState<Source | null>(null);
  const [dialect, setDialect] = useState<CsvDialect>({ delimiter: ',', decimalComma: false });
  const [mappingState, setMappingState] = useState<MappingState | null>(null);
  const [readError, setReadError] = useState<string | null>(null);

  const ingest = useMemo(() => ingestCatalogue(catalogue), [catalogue]);
  const activeCharacteristics = useMemo(() => catalogue.characteristics.filter((c) => c.active), [catalogue]);
  const parsed = useMemo(() => (source ? parseCsv(source.text, dialect) : null), [source, dialect]);
  const needsMapping = !!parsed && parsed.headers.length > 0 && !hasCanonicalHeaders(parsed.headers);
  // Memoised down to the check, so that a large file is validated again only when something it depends on changes.
  const activeMapping = useMemo(
    () => (parsed && needsMapping ? (mappingState ?? initialMapping(parsed.headers, savedMappings.data ?? [], activeCharacteristics.map((c) => c.code))) : null),
    [parsed, needsMapping, mappingState, savedMappings.data, activeCharacteristics],
  );
  const built = useMemo(() => (activeMapping ? mappingFromDraft(activeMapping.draft) : null), [activeMapping]);
  const mapping = built?.mapping ?? undefined;
  // Rows are checked once every column the mapping names is in the file; until then the mapping card says what is missing.
  const mappingComplete = !needsMapping || (!!mapping && missingColumns(parsed.headers, mapping).length === 0);
  const check = useMemo(
    () => (source && parsed && mappingComplete ? checkFile(source.text, parsed, mapping, ingest) : null),
    [source, parsed, mappingComplete, mapping, ingest],
  );
  const lots = useMemo(() => (check ? [...new Set(check.valid.map((v) => v.lot))] : []), [check]);

  const readFile = async (file: File) => {
    upload.reset();
    setReadError(null);
    if (file.size > MAX_UPLOAD_BYTES) return setReadError(`${file.name} is larger than 20 MB; split it into shifts or weeks.`);
    if (/\.xlsx?$/i.test(file.name)) return setReadError(`${file.name} is a spreadsheet workbook; export the sheet as CSV first.`);
    let text: string;
    try {
      text = decodeText(new Uint8Array(await file.arrayBuffer()));
    } catch {
      return setReadError(`${file.name} could not be read. Choose it again, or copy it to this computer first.`);
    }
    // Binary content, no delimiter or no header: no mapping of columns could make rows of it, so it goes no further.
    const notResults = notAResultsFile(text);
    if (notResults) {
      setSource(null);
      return setReadError(`${file.name}: ${notResults}.`);
    }
    const detected = detectDialect(text);
    setSource({ file, text, detected });
    setDialect(detected);
    setMappingState(null);
  };

  const changeDialect = (next: CsvDialect) => {
    upload.reset();
    // Another delimiter gives other headers: the mapping starts again from them.
    if (next.delimiter !== dialect.delimiter) setMappingState(null);
    setDialect(next);
  };

  const changeMapping = (draft: MappingDraft, savedName?: string) => {
    upload.reset();
    setMappingState({ draft, savedName });
  };

  const records = parsed?.records.length ?? 0;
  const wide = mapping?.format === 'wide';

  return (
    <div className="space-y-5">
      <Card title="1. The file">
        <div className="space-y-3">
          {source && (
            <p className="text-zinc-800">
              <span className="font-medium [overflow-wrap:anywhere]">{source.file.name}</span> ·{' '}
              <span className="font-mono">{formatSize(source.file.size)}</span> · <span className="font-mono">{formatCount(records)}</span> data row{records === 1 ? '' : 's'}
            </p>
          )}
          <FileDrop onFile={readFile} compact={!!source} disabled={upload.isPending} />
          {readError && <Alert tone="error">{readError}</Alert>}
        </div>
      </Card>

      {source && parsed && (
        <Card title="2. How the file is read">
          <div className="space-y-4">
            <DialectControls detected={source.detected} dialect={dialect} onChange={changeDialect} />
            {parsed.headers.length > 0 && (
              <>
                <p className="text-sm text-zinc-600">{records > PREVIEW_ROWS ? `The first ${PREVIEW_ROWS} of ${records} rows:` : records === 1 ? 'The one row:' : `All ${records} rows:`}</p>
                <PreviewTable parsed={parsed} rowsWithErrors={check?.rowsWithErrors ?? new Set()} />
              </>
            )}
            {!needsMapping && parsed.headers.length > 0 && <p className="text-zinc-700">The columns have the template's names: no mapping is needed.</p>}
          </div>
        </Card>
      )}

      {needsMapping && activeMapping && (
        <Card title="3. Which column holds what">
          <p className="mb-4 text-zinc-700">The headers of this file are not the template's. Say which column holds what; save the mapping to reuse it for the next file of this kind.</p>
          <MappingEditor
            headers={parsed.headers}
            draft={activeMapping.draft}
            savedName={activeMapping.savedName}
            onChange={changeMapping}
            mapping={built?.mapping ?? null}
            mappingError={built?.error ?? null}
            characteristics={activeCharacteristics}
            savedMappings={savedMappings.data ?? []}
          />
        </Card>
      )}

      {needsMapping && !mappingComplete && (
        <Card title="4. Check and import">
          <div className="flex flex-wrap items-center gap-3">
            <Button disabled>Finish the mapping first</Button>
            <p className="text-zinc-700">Choose the columns step 3 still asks for; the rows are checked as soon as the mapping is complete.</p>
          </div>
        </Card>
      )}

      {check && (
        <Card title={`${needsMapping ? '4' : '3'}. Check and import`}>
          {upload.data ? (
            <div className="space-y-4">
              <UploadOutcome outcome={upload.data} fileName={source!.file.name} lots={lots} />
              {upload.data.kind === 'imported' && (
                <Button
                  variant="secondary"
                  onClick={() => {
                    upload.reset();
                    setSource(null);
                  }}
                >
                  Upload another file
                </Button>
              )}
            </div>
          ) : (
            <div className="space-y-4">
              {check.errors.length > 0 ? (
                <>
                  <Alert tone="error">
                    <p className="font-semibold">
                      <span className="font-mono">{formatCount(check.rowsWithErrors.size)}</span> row{check.rowsWithErrors.size === 1 ? ' needs' : 's need'} correcting. Nothing can be
                      imported until the file is corrected.
                    </p>
                    <p className="mt-1">Correct the rows in the file, save it and choose it again.</p>
                  </Alert>
                  <RowErrorList errors={check.errors} caption="Rows to correct" />
                </>
              ) : (
                <p className="text-zinc-800" role="status">
                  The file passed the checks: <span className="font-mono">{plural(records, 'row')}</span>
                  {wide && (
                    <>
                      , <span className="font-mono">{plural(check.valid.length, 'result')}</span>
                    </>
                  )}
                  , <span className="font-mono">{plural(lots.length, 'lot')}</span>. The server checks them once more against what is already stored.
                </p>
              )}
              {upload.isError && <ErrorState title="The file was not sent" error={upload.error} />}
              <div className="flex flex-wrap items-center gap-3">
                <Button
                  disabled={check.errors.length > 0 || check.valid.length === 0}
                  busy={upload.isPending}
                  onClick={() => upload.mutate({ file: source!.file, mapping, dialect })}
                >
                  {importLabel(check.errors.length > 0, wide, check.valid.length, records)}
                </Button>
                <p className="text-sm text-zinc-600">All rows are imported together, or none.</p>
              </div>
            </div>
          )}
        </Card>
      )}
    </div>
  );
}
