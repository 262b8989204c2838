/**
 * Bring sites in from a file: the server parses and checks the whole file (CSV, XYZ, placement list
 * or design JSON) and writes nothing; here the modeller sees every row's problem with its line
 * number, and puts the sites in only when the file is clean and they accept (one undoable edit).
 */
import { useEffect, useRef, useState } from 'react';
import type { DesignImportResponse } from '@contracts/api';
import { Button } from '../../components/Button';
import { useEditorStore } from './editorContext';
import { useImportDesignFile } from './importDesign';

export function ImportPanel({ projectId, designId }: { projectId: number; designId: number }) {
  const store = useEditorStore();
  const upload = useImportDesignFile(projectId, designId);
  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<DesignImportResponse | null>(null);
  const [done, setDone] = useState<string | null>(null);
  // The panel sits low in the scrolling Build column: bring the preview (and its list of problem
  // lines) into view when it appears, and move focus there so a screen reader reads it too.
  const previewRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!preview || !previewRef.current) return;
    previewRef.current.scrollIntoView({ block: 'nearest' });
    previewRef.current.focus({ preventScroll: true });
  }, [preview]);

  const check = () => {
    if (!file) return;
    setDone(null);
    upload.mutate(file, { onSuccess: (r) => setPreview(r) });
  };
  const accept = (mode: 'replace' | 'add') => {
    if (!preview) return;
    store.getState().putSites(preview.sites, mode);
    setDone(`${mode === 'replace' ? 'Replaced the sites with' : 'Added'} ${preview.sites.length} imported sites. Undo takes them out again.`);
    setPreview(null);
  };

  return (
    <section aria-label="Import sites from a file" className="space-y-2 text-note">
      <label htmlFor="import-file" className="block text-fine font-semibold text-wafer-700">
        File to import <span className="font-normal text-wafer-500">(CSV with id, species, x_nm, y_nm, z_nm; XYZ in Å; placement list; design JSON)</span>
      </label>
      <input
        id="import-file"
        type="file"
        accept=".csv,.xyz,.txt,.json,.placement,text/plain,text/csv,application/json"
        onChange={(e) => {
          setFile(e.target.files?.[0] ?? null);
          setPreview(null);
          upload.reset();
        }}
        className="block w-full text-fine"
      />
      <Button variant="secondary" disabled={!file || upload.isPending} onClick={check}>
        {upload.isPending ? 'Checking…' : 'Check the file'}
      </Button>
      {upload.isError && (
        <p role="alert" className="text-garnet-700">
          {upload.error.message}
        </p>
      )}
      {preview && (
        <div ref={previewRef} tabIndex={-1} aria-label="Import preview" role="group" className="scroll-my-2 space-y-1.5 rounded border border-wafer-200 bg-wafer-50 p-2">
          <p>
            {preview.sites.length} site{preview.sites.length === 1 ? '' : 's'} read{preview.errors.length > 0 ? `, ${preview.errors.length} row${preview.errors.length === 1 ? '' : 's'} with problems` : ', no problems'}.
          </p>
          {preview.errors.length > 0 ? (
            <>
              <ul aria-label="Problems in the file" className="max-h-40 list-disc space-y-0.5 overflow-auto pl-5 text-garnet-700">
                {preview.errors.map((e, i) => (
                  <li key={i}>
                    <span className="font-semibold">line {e.line}:</span> {e.message}
                  </li>
                ))}
              </ul>
              <p className="text-wafer-600">Nothing has changed. Fix these rows and check the file again.</p>
            </>
          ) : (
            <div className="flex flex-wrap gap-1.5">
              <Button onClick={() => accept('replace')}>Use these sites</Button>
              <Button variant="secondary" onClick={() => accept('add')}>
                Add them to the current sites
              </Button>
              <Button variant="quiet" onClick={() => setPreview(null)}>
                Discard
              </Button>
            </div>
          )}
        </div>
      )}
      {done && <p role="status" className="text-phosphor-800">{done}</p>}
    </section>
  );
}
