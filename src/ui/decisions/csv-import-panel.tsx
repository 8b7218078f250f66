// CSV import with a column-mapping step: pick the table and the file, map each of our columns to
// one of the file's columns (proposed by name), check. Every bad row is listed with its row,
// column, value and reason and nothing is handed over; a clean file is handed to `onImport` as the
// whole new campaign, which the caller writes in one transaction (src/store/import-rows.ts). The
// campaign page mounts it with the campaign read together with its change-log position
// (`version`): a check made on an older version is not offered for import, and the version goes
// back to the writer, which refuses the import if the campaign moved in between.
import { IonButton, IonCheckbox, IonItem, IonLabel, IonList, IonSelect, IonSelectOption } from '@ionic/react';
import { useState } from 'react';
import { v7 as uuidv7 } from 'uuid';
import type { CampaignFile } from '../../campaign/records.ts';
import { ValidationError, describeValue, type Problem } from '../../errors.ts';
import { importCsvTable, matchColumns, readCsv, RECORD_TABLES, RECORD_TABLE_IDS, type CsvImportResult, type ImportMode, type RecordTableId } from '../../io/index.ts';

/** What the checked import is, for the writer. */
export interface CsvImportRequest {
  result: CsvImportResult;
  table: RecordTableId;
  mode: ImportMode;
  /** The `version` of the campaign the file was checked against. */
  version: number | undefined;
  /** The file's name, for messages. */
  source: string;
}

/** What the writer stored. */
export interface CsvImportCounts {
  added: number;
  changed: number;
  removed: number;
}

export interface CsvImportPanelProps {
  campaign: CampaignFile;
  /** Changes whenever the campaign does (the store's change-log sequence); a check on another version is stale. */
  version?: number;
  /** Store the checked result (the whole campaign after the import); reject with the error to show. */
  onImport: (request: CsvImportRequest) => Promise<CsvImportCounts>;
}

const NOT_IN_FILE = '';
/** Problems shown at once; the count of the rest is given (a 10 000-row file can fail on every row). */
const MAX_SHOWN = 200;

type Checked = { ok: true; result: CsvImportResult; mode: ImportMode; version: number | undefined } | { ok: false; problems: Problem[] } | null;

export function CsvImportPanel({ campaign, version, onImport }: CsvImportPanelProps) {
  const [table, setTable] = useState<RecordTableId>('latitude');
  const [text, setText] = useState<string | null>(null);
  const [fileName, setFileName] = useState('');
  const [header, setHeader] = useState<string[]>([]);
  const [mapping, setMapping] = useState<Record<string, string>>({});
  const [replace, setReplace] = useState(false);
  const [addStations, setAddStations] = useState(false);
  const [checked, setChecked] = useState<Checked>(null);
  const [status, setStatus] = useState<{ phase: 'saving' | 'saved' | 'failed'; text: string } | null>(null);

  const propose = (h: string[], t: RecordTableId): void => {
    const m = matchColumns(h, t);
    const next: Record<string, string> = {};
    for (const c of RECORD_TABLES[t].columns) {
      const i = m.columns.get(c.name);
      next[c.name] = i === undefined ? NOT_IN_FILE : h[i];
    }
    setMapping(next);
    setChecked(null);
  };

  const onFile = async (file: File | undefined): Promise<void> => {
    setChecked(null);
    setStatus(null);
    if (!file) return;
    const body = await file.text();
    setFileName(file.name);
    try {
      const parsed = readCsv(body, file.name);
      setText(body);
      setHeader(parsed.header);
      propose(parsed.header, table);
    } catch (err) {
      setText(null);
      setHeader([]);
      if (err instanceof ValidationError) setChecked({ ok: false, problems: [...err.problems] });
      else throw err;
    }
  };

  const check = (): void => {
    if (text === null) return;
    setStatus(null);
    const mode: ImportMode = replace ? 'replace' : 'append';
    const used = Object.entries(mapping).filter(([, theirs]) => theirs !== NOT_IN_FILE);
    const usedHeaders = new Set(used.map(([, theirs]) => theirs));
    try {
      const result = importCsvTable(campaign, text, {
        table, mapping: Object.fromEntries(used),
        // Columns left unmapped were shown to the person in the mapping step: leaving them out is their choice.
        ignore: header.filter((h) => !usedHeaders.has(h)),
        mode, addMissingStations: addStations,
        newId: mapping.id === NOT_IN_FILE || mapping.id === undefined ? () => uuidv7() : undefined,
        source: fileName,
      });
      setChecked({ ok: true, result, mode, version });
    } catch (err) {
      if (err instanceof ValidationError) setChecked({ ok: false, problems: [...err.problems] });
      else throw err;
    }
  };

  const store = async (): Promise<void> => {
    if (!checked?.ok) return;
    setStatus({ phase: 'saving', text: 'Saving…' });
    try {
      const n = await onImport({ result: checked.result, table, mode: checked.mode, version: checked.version, source: fileName });
      setStatus({ phase: 'saved', text: `Saved: ${n.added} added, ${n.changed} changed, ${n.removed} removed.` });
      setChecked(null);
    } catch (err) {
      // The writer's own checks (a reading deleted on this device, a campaign that moved) list their problems like the file's.
      if (err instanceof ValidationError) {
        setChecked({ ok: false, problems: [...err.problems] });
        setStatus({ phase: 'failed', text: 'Not saved: see the problems above.' });
        return;
      }
      const message = err instanceof Error ? err.message : String(err);
      setStatus({ phase: 'failed', text: /^Not saved/.test(message) ? message : `Not saved: ${message}` });
    }
  };

  const stale = checked?.ok === true && checked.version !== version;

  const columns = RECORD_TABLES[table].columns;
  const unused = header.filter((h) => !Object.values(mapping).includes(h));
  return (
    <div className="af-card" data-testid="csv-import">
      <h2>Import a CSV table</h2>
      <IonList>
        <IonItem>
          <IonSelect label="Table" value={table} onIonChange={(e) => { const t = e.detail.value as RecordTableId; setTable(t); if (header.length > 0) propose(header, t); }}>
            {RECORD_TABLE_IDS.map((t) => <IonSelectOption key={t} value={t}>{t}</IonSelectOption>)}
          </IonSelect>
        </IonItem>
        <IonItem>
          <IonLabel>CSV file (UTF-8, one header row)</IonLabel>
          <input type="file" accept=".csv,text/csv" data-testid="csv-file" onChange={(e) => void onFile(e.currentTarget.files?.[0])} />
        </IonItem>
      </IonList>
      {header.length > 0 && (
        <>
          <h3>Columns</h3>
          <IonList>
            {columns.map((c) => (
              <IonItem key={c.name}>
                <IonSelect label={`${c.name}${c.required ? ' (required)' : ''}`} labelPlacement="stacked" value={mapping[c.name] ?? NOT_IN_FILE}
                  onIonChange={(e) => { setMapping({ ...mapping, [c.name]: String(e.detail.value) }); setChecked(null); }}>
                  <IonSelectOption value={NOT_IN_FILE}>(not in the file)</IonSelectOption>
                  {header.map((h) => <IonSelectOption key={h} value={h}>{h}</IonSelectOption>)}
                </IonSelect>
              </IonItem>
            ))}
            <IonItem><IonCheckbox checked={replace} onIonChange={(e) => { setReplace(e.detail.checked); setChecked(null); }}>Replace the whole table</IonCheckbox></IonItem>
            {(table === 'latitude' || table === 'arc') && (
              <IonItem><IonCheckbox checked={addStations} onIonChange={(e) => { setAddStations(e.detail.checked); setChecked(null); }}>Create missing stations</IonCheckbox></IonItem>
            )}
          </IonList>
          {unused.length > 0 && <p>Not imported: {unused.join(', ')}</p>}
          <IonButton expand="block" onClick={check} data-testid="csv-check">Check the file</IonButton>
        </>
      )}
      {checked?.ok === false && (
        <div role="alert" data-testid="csv-problems">
          <p>Nothing was stored: {checked.problems.length} problem{checked.problems.length === 1 ? '' : 's'}.</p>
          <ul>
            {checked.problems.slice(0, MAX_SHOWN).map((p, i) => <li key={i}>{p.field}: {describeValue(p.value)} — {p.reason}</li>)}
          </ul>
          {checked.problems.length > MAX_SHOWN && <p>…and {checked.problems.length - MAX_SHOWN} more.</p>}
        </div>
      )}
      {stale && <p role="alert" data-testid="csv-stale">The campaign changed since the check (a save or a sync): check the file again.</p>}
      {checked?.ok === true && !stale && (
        <>
          <p data-testid="csv-ready">{checked.result.imported} rows ready{checked.result.addedStations.length > 0 ? `; new stations ${checked.result.addedStations.join(', ')}` : ''}.</p>
          <IonButton expand="block" onClick={() => void store()} data-testid="csv-import-go">Import {checked.result.imported} rows</IonButton>
        </>
      )}
      {status && <p role="status" data-testid="csv-import-status" data-phase={status.phase}>{status.text}</p>}
    </div>
  );
}
