/**
 * The site table's Orbital cell: the site's orbital in words, and for editors a small form that sets
 * or drops the site's own override (checked by `editOrbital`).
 *
 * The form floats above the page (a portal to document.body, placed by Floating UI): the site
 * table is a short scroll box and clips anything drawn inside it, so the form is placed against the
 * window instead, below the cell or above it when there is no room, kept inside the window, and
 * hidden while its row is scrolled out of the table's view. In the React tree it stays inside the
 * cell, so its clicks and keys do not reach the row (selection) or the workspace shortcuts.
 */
import { useEffect, useRef, useState } from 'react';
import { createPortal } from 'react-dom';
import { autoUpdate, flip, hide, offset, shift, size, useFloating } from '@floating-ui/react-dom';
import { useEditorStore } from './editorContext';
import type { SiteRow } from './siteColumns';
import { editOrbital, orbitalFieldsOf, type OrbitalChoice } from './orbitalEdit';

export function OrbitalCell({ row, readOnly }: { row: SiteRow; readOnly: boolean }) {
  const store = useEditorStore();
  const [open, setOpen] = useState(false);
  const start = orbitalFieldsOf(row.site);
  const [model, setModel] = useState<OrbitalChoice>(start.model);
  const [sizeNm, setSizeNm] = useState(start.fields.size);
  const [sizeZNm, setSizeZNm] = useState(start.fields.sizeZ);
  const [error, setError] = useState<string | null>(null);
  const [button, setButton] = useState<HTMLButtonElement | null>(null);
  const [floating, setFloating] = useState<HTMLDivElement | null>(null);
  const first = useRef<HTMLSelectElement>(null);
  const { floatingStyles, middlewareData } = useFloating({
    open,
    elements: { reference: button, floating },
    strategy: 'fixed',
    placement: 'bottom-end',
    whileElementsMounted: autoUpdate,
    middleware: [
      offset(4),
      flip({ padding: 8 }),
      shift({ padding: 8 }),
      // never taller than the room the window leaves; the form scrolls inside itself then
      size({ padding: 8, apply: ({ availableHeight, elements }) => void (elements.floating.style.maxHeight = `${Math.max(160, availableHeight)}px`) }),
      hide({ strategy: 'referenceHidden' }),
    ],
  });
  const id = row.site.id;

  const close = (refocus: boolean) => {
    setOpen(false);
    if (refocus) button?.focus();
  };

  // a press outside the form (and outside its cell) closes it, as Escape does
  useEffect(() => {
    if (!open) return;
    const onDown = (e: PointerEvent) => {
      const t = e.target as Node;
      if (floating?.contains(t) || button?.contains(t)) return;
      setOpen(false);
    };
    document.addEventListener('pointerdown', onDown, true);
    return () => document.removeEventListener('pointerdown', onDown, true);
  }, [open, floating, button]);

  // the form takes the focus when it opens
  useEffect(() => {
    if (open) first.current?.focus();
  }, [open]);

  const text = (
    <>
      {row.orbitalText}
      {row.orbitalIsPreset ? (
        <span className="ml-1 rounded bg-wafer-100 px-1 text-fine text-wafer-600">species preset</span>
      ) : (
        <span className="ml-1 rounded bg-phosphor-50 px-1 text-fine text-phosphor-800">own override</span>
      )}
    </>
  );
  if (readOnly) return <span>{text}</span>;
  const apply = () => {
    const r = editOrbital(row.site, model, { size: sizeNm, sizeZ: sizeZNm });
    if ('error' in r) return setError(r.error);
    setError(null);
    close(true);
    if (JSON.stringify(r.site.orbital) !== JSON.stringify(row.site.orbital)) store.getState().updateSite(id, { orbital: r.site.orbital });
  };
  return (
    <span className="block w-full" onClick={(e) => e.stopPropagation()}>
      <button
        ref={setButton}
        type="button"
        aria-label={`Edit orbital of site ${id}`}
        aria-expanded={open}
        className="w-full rounded px-1 text-left hover:bg-phosphor-50 focus-visible:outline-2 focus-visible:outline-phosphor-500"
        onClick={() => {
          const f = orbitalFieldsOf(row.site);
          setModel(f.model);
          setSizeNm(f.fields.size);
          setSizeZNm(f.fields.sizeZ);
          setError(null);
          setOpen((o) => !o);
        }}
      >
        {text}
      </button>
      {open &&
        createPortal(
          <div
            ref={setFloating}
            role="group"
            aria-label={`Orbital of site ${id}`}
            style={{ ...floatingStyles, visibility: middlewareData.hide?.referenceHidden ? 'hidden' : 'visible' }}
            className="z-50 w-72 space-y-1.5 overflow-y-auto rounded-md border border-wafer-300 bg-white p-2 text-note text-wafer-900 shadow-lg"
            onKeyDown={(e) => {
              e.stopPropagation();
              if (e.key === 'Enter') apply();
              if (e.key === 'Escape') close(true);
            }}
          >
            <label className="block text-fine font-semibold text-wafer-700">
              Orbital model
              <select ref={first} value={model} onChange={(e) => setModel(e.target.value as OrbitalChoice)} className="mt-0.5 block w-full rounded border border-wafer-300 bg-white px-1 py-0.5 font-normal">
                <option value="preset">Species preset (no override)</option>
                <option value="hydrogenic-1s">Hydrogenic 1s</option>
                <option value="anisotropic-1s">Anisotropic 1s</option>
                <option value="gaussian">Gaussian</option>
              </select>
            </label>
            {model !== 'preset' && (
              <label className="block text-fine font-semibold text-wafer-700">
                {model === 'gaussian' ? 'Sigma' : model === 'anisotropic-1s' ? 'In-plane radius' : 'Radius'} <span className="font-normal text-wafer-600">(nm)</span>
                <input value={sizeNm} onChange={(e) => setSizeNm(e.target.value)} inputMode="decimal" className="num mt-0.5 block w-full rounded border border-wafer-300 px-1 py-0.5 font-normal" />
              </label>
            )}
            {model === 'anisotropic-1s' && (
              <label className="block text-fine font-semibold text-wafer-700">
                Radius along [001] <span className="font-normal text-wafer-600">(nm)</span>
                <input value={sizeZNm} onChange={(e) => setSizeZNm(e.target.value)} inputMode="decimal" className="num mt-0.5 block w-full rounded border border-wafer-300 px-1 py-0.5 font-normal" />
              </label>
            )}
            {error && (
              <p role="alert" className="text-fine text-garnet-700">
                {error}
              </p>
            )}
            <div className="flex gap-1.5">
              <button type="button" onClick={apply} className="rounded-md bg-phosphor-700 px-2.5 py-1 font-semibold text-white">
                Apply
              </button>
              <button type="button" onClick={() => close(true)} className="rounded-md border border-wafer-300 px-2.5 py-1 font-semibold">
                Cancel
              </button>
            </div>
          </div>,
          document.body,
        )}
    </span>
  );
}
