/**
 * The workspace's editor state: the design document being edited, the selection, and the
 * undo/redo history (zustand with zundo's `temporal`).
 *
 * Only the document is tracked by the history, and every edit replaces it with a new object
 * (never mutates it), so undo hands back the very object that was current before, key for key:
 * undo and redo restore the exact document. Selection changes and the "saved" marker are not
 * edits and leave the history alone.
 */
import { createStore, type StoreApi } from 'zustand/vanilla';
import { temporal, type TemporalState } from 'zundo';
import type { DesignDocument } from '@contracts/design';
import { withElectrodes, withLayers } from './device/deviceEdit';

export type Site = DesignDocument['sites'][number];
export type Domain = DesignDocument['domain'];
export type Refinement = DesignDocument['refinement'];
export type Vec3 = [number, number, number];
export type Layer = NonNullable<DesignDocument['host']['layers']>[number];
export type Electrode = NonNullable<DesignDocument['electrodes']>[number];
export type ElectrodeWalls = NonNullable<DesignDocument['domain']['electrodeWalls']>;

export interface EditorState {
  document: DesignDocument;
  /** the document as last loaded or saved: autosave runs while `document !== savedDocument` */
  savedDocument: DesignDocument;
  /** ids of the selected sites */
  selection: string[];

  /** A fresh document from the server: replaces everything and forgets the history. */
  load: (doc: DesignDocument) => void;
  /** Record that `doc` is what the server now holds. */
  markSaved: (doc: DesignDocument) => void;
  /** Put sites in: `replace` drops the current ones, `add` keeps them (ids that clash get a suffix). */
  putSites: (sites: Site[], mode: 'replace' | 'add') => void;
  /** A new site at a position (the caller snaps it to the lattice); returns its id. */
  placeSite: (species: Site['species'], position: Vec3) => string;
  /** Move the given sites to new positions (one undo step for the whole move). */
  moveSites: (positions: Record<string, Vec3>) => void;
  deleteSites: (ids: readonly string[]) => void;
  /** Change one site's fields (id, species, electrons, position, orbital). */
  updateSite: (id: string, patch: Partial<Site>) => void;
  setDomain: (domain: Domain) => void;
  setRefinement: (refinement: Refinement) => void;
  /** The host's planar stack, bottom to top; an empty list removes `host.layers` (εr everywhere again). */
  setLayers: (layers: readonly Layer[]) => void;
  /** The metal boxes; an empty list removes `electrodes`. */
  setElectrodes: (electrodes: readonly Electrode[]) => void;
  /** What the domain walls are for the electrodes' problem. */
  setElectrodeWalls: (walls: ElectrodeWalls) => void;
  rename: (name: string) => void;
  /** Select ids: `replace` the selection, `toggle` each id in or out, or `add` them. */
  select: (ids: readonly string[], how?: 'replace' | 'toggle' | 'add') => void;
}

export type EditorStore = StoreApi<EditorState> & { temporal: StoreApi<TemporalState<{ document: DesignDocument }>> };

/** The first id of the form `${prefix}${n}` (n = 1, 2, …) not in `taken`. */
export function freeId(taken: ReadonlySet<string>, prefix = 'd'): string {
  for (let n = 1; ; n++) if (!taken.has(`${prefix}${n}`)) return `${prefix}${n}`;
}

/** Ids unique against `taken`: a clashing id gets `-2`, `-3`, … (cluster labels follow their sites). */
function dedupe(sites: Site[], taken: Set<string>): Site[] {
  return sites.map((s) => {
    if (!taken.has(s.id)) {
      taken.add(s.id);
      return s;
    }
    let k = 2;
    while (taken.has(`${s.id}-${k}`)) k++;
    const id = `${s.id}-${k}`;
    taken.add(id);
    return { ...s, id, ...(s.cluster ? { cluster: `${s.cluster}-${k}` } : {}) };
  });
}

export function createEditorStore(initial: DesignDocument): EditorStore {
  const store = createStore<EditorState>()(
    temporal(
      (set, get) => {
        const edit = (next: (doc: DesignDocument) => DesignDocument) => set({ document: next(get().document) });
        return {
          document: initial,
          savedDocument: initial,
          selection: [],
          load: (doc) => {
            set({ document: doc, savedDocument: doc, selection: [] });
            // a load is not an edit: start the history afresh
            store.temporal.getState().clear();
          },
          markSaved: (doc) => set({ savedDocument: doc }),
          putSites: (sites, mode) =>
            edit((doc) => {
              const kept = mode === 'replace' ? [] : doc.sites;
              const added = dedupe(sites, new Set(kept.map((s) => s.id)));
              return { ...doc, sites: [...kept, ...added] };
            }),
          placeSite: (species, position) => {
            const id = freeId(new Set(get().document.sites.map((s) => s.id)));
            edit((doc) => ({ ...doc, sites: [...doc.sites, { id, species, position, electrons: 1 }] }));
            set({ selection: [id] });
            return id;
          },
          moveSites: (positions) =>
            edit((doc) => ({ ...doc, sites: doc.sites.map((s) => (positions[s.id] ? { ...s, position: positions[s.id] } : s)) })),
          deleteSites: (ids) => {
            const gone = new Set(ids);
            if (gone.size === 0) return;
            edit((doc) => ({ ...doc, sites: doc.sites.filter((s) => !gone.has(s.id)) }));
            set({ selection: get().selection.filter((id) => !gone.has(id)) });
          },
          updateSite: (id, patch) => {
            edit((doc) => ({
              ...doc,
              sites: doc.sites.map((s) => {
                if (s.id !== id) return s;
                const next: Site = { ...s, ...patch };
                // `orbital: undefined` in a patch means "back to the species preset": drop the key
                if ('orbital' in patch && patch.orbital === undefined) delete next.orbital;
                return next;
              }),
            }));
            if (patch.id && patch.id !== id) set({ selection: get().selection.map((s) => (s === id ? patch.id! : s)) });
          },
          setDomain: (domain) => edit((doc) => ({ ...doc, domain })),
          setRefinement: (refinement) => edit((doc) => ({ ...doc, refinement })),
          setLayers: (layers) => edit((doc) => withLayers(doc, layers)),
          setElectrodes: (electrodes) => edit((doc) => withElectrodes(doc, electrodes)),
          setElectrodeWalls: (walls) => edit((doc) => ({ ...doc, domain: { ...doc.domain, electrodeWalls: walls } })),
          rename: (name) => edit((doc) => ({ ...doc, name })),
          select: (ids, how = 'replace') => {
            if (how === 'replace') return set({ selection: [...ids] });
            const cur = new Set(get().selection);
            for (const id of ids) {
              if (how === 'toggle' && cur.has(id)) cur.delete(id);
              else cur.add(id);
            }
            set({ selection: [...cur] });
          },
        };
      },
      {
        partialize: (s) => ({ document: s.document }),
        // a new history entry only when the document object changed (selection moves are not edits)
        equality: (a, b) => a.document === b.document,
        limit: 200,
      },
    ),
  ) as EditorStore;
  return store;
}
