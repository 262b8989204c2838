/**
 * Autosave: a moment (1.5 s) after the last edit the document goes to the server with the version
 * it was based on. A 409 `stale_write` stops autosaving and keeps the edits: the workspace then
 * shows who saved last and when, and offers to reload theirs or keep this one as a copy. A stale
 * save never overwrites silently.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import { useStore } from 'zustand';
import type { DesignDocument } from '@contracts/design';
import { ApiError, type StaleCurrent } from '../../lib/api';
import type { EditorStore } from './editorStore';
import { saveDesign } from './saveDesign';

export const AUTOSAVE_DELAY_MS = 1500;

export type SaveState =
  | { kind: 'saved'; version: number; at: string | null }
  | { kind: 'pending' }
  | { kind: 'saving' }
  | { kind: 'stale'; current: StaleCurrent | null; message: string }
  | { kind: 'failed'; message: string };

export function useAutosave(store: EditorStore, projectId: number, designId: number, initialVersion: number, initialAt: string, enabled: boolean) {
  const doc = useStore(store, (s) => s.document);
  const saved = useStore(store, (s) => s.savedDocument);
  const version = useRef(initialVersion);
  const [state, setState] = useState<SaveState>({ kind: 'saved', version: initialVersion, at: initialAt });
  const inFlight = useRef(false);
  const blocked = state.kind === 'stale';

  const saveNow = useCallback(async () => {
    if (inFlight.current) return;
    const sending: DesignDocument = store.getState().document;
    if (sending === store.getState().savedDocument) return;
    inFlight.current = true;
    setState({ kind: 'saving' });
    try {
      const result = await saveDesign(projectId, designId, { document: sending, version: version.current, name: sending.name });
      version.current = result.version;
      store.getState().markSaved(sending);
      setState(store.getState().document === sending ? { kind: 'saved', version: result.version, at: result.updatedAt } : { kind: 'pending' });
    } catch (err) {
      if (err instanceof ApiError && err.status === 409) setState({ kind: 'stale', current: err.current, message: err.message });
      else setState({ kind: 'failed', message: err instanceof Error ? err.message : String(err) });
    } finally {
      inFlight.current = false;
    }
  }, [store, projectId, designId]);

  const dirty = doc !== saved;
  useEffect(() => {
    if (!enabled || !dirty || blocked) return;
    const t = window.setTimeout(() => void saveNow(), AUTOSAVE_DELAY_MS);
    return () => window.clearTimeout(t);
  }, [doc, dirty, enabled, blocked, saveNow, state.kind]);

  // leaving with unsaved edits asks first
  useEffect(() => {
    if (!dirty) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [dirty]);

  /** After "reload theirs": continue from the version now loaded. */
  const resetTo = useCallback((v: number, at: string) => {
    version.current = v;
    setState({ kind: 'saved', version: v, at });
  }, []);

  return { state, dirty, saveNow, resetTo, version };
}
