/**
 * The workspace's store in React: one editor store per open design, handed down by context, read
 * with selectors (so the canvas, table and forms re-render only for the parts they show).
 */
import { createContext, useContext } from 'react';
import { useStore } from 'zustand';
import type { EditorState, EditorStore } from './editorStore';

export const EditorContext = createContext<EditorStore | null>(null);

export function useEditorStore(): EditorStore {
  const store = useContext(EditorContext);
  if (!store) throw new Error('useEditor outside the workspace');
  return store;
}

export function useEditor<T>(selector: (s: EditorState) => T): T {
  return useStore(useEditorStore(), selector);
}

/** Whether undo and redo have anything to do (for the buttons' disabled state). */
export function useHistoryDepth(): { past: number; future: number } {
  const store = useEditorStore();
  const past = useStore(store.temporal, (t) => t.pastStates.length);
  const future = useStore(store.temporal, (t) => t.futureStates.length);
  return { past, future };
}
