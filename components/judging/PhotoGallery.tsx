'use client';
/**
 * Entry photos as thumbnails; a click opens the full-size photo (a view the server audits) in a
 * lightbox: a modal <dialog> (focus kept inside, Esc closes, focus returns to the thumbnail),
 * ← / → move between photos, + / − or a click on the photo zoom, and the zoomed photo scrolls.
 */
import { useCallback, useEffect, useRef, useState } from 'react';

export interface GalleryPhoto { id: number; name: string; capturedAt: string | null; url: string; thumbUrl: string }

const ZOOMS = [1, 2, 4] as const;

export function PhotoGallery({ photos }: { photos: GalleryPhoto[] }) {
  const [index, setIndex] = useState<number | null>(null);
  const [zoom, setZoom] = useState(0);
  const dialog = useRef<HTMLDialogElement>(null);
  const opener = useRef<HTMLButtonElement | null>(null);
  const open = index === null ? null : photos[index];

  const close = useCallback(() => {
    setIndex(null);
    setZoom(0);
    opener.current?.focus();
  }, []);
  const move = useCallback((d: number) => {
    setIndex((i) => (i === null ? i : (i + d + photos.length) % photos.length));
    setZoom(0);
  }, [photos.length]);

  useEffect(() => {
    const d = dialog.current;
    if (open && d && !d.open) d.showModal();
  }, [open]);

  if (!photos.length) return <p className="text-sm text-ink-600">No photos were uploaded.</p>;
  return (
    <>
      <ul className="grid grid-cols-2 gap-3" data-testid="photos">
        {photos.map((p, i) => (
          <li key={p.id} className="min-w-0">
            <button type="button" onClick={(e) => { opener.current = e.currentTarget; setIndex(i); }} className="block w-full cursor-zoom-in rounded-lg border border-ink-200 bg-ink-50 p-1" aria-label={`Open ${p.name} at full size`}>
              {/* eslint-disable-next-line @next/next/no-img-element -- private, access-checked files are not for the image optimizer */}
              <img src={p.thumbUrl} alt={p.name} className="aspect-[4/3] w-full rounded object-cover" loading="lazy" />
            </button>
            <p className="mt-1 truncate text-xs text-ink-600">{p.name}</p>
            <p className="num text-xs text-ink-500">{p.capturedAt ? `captured ${p.capturedAt.replace('T', ' ')}` : 'no capture time in the file'}</p>
          </li>
        ))}
      </ul>
      {open && (
        <dialog
          ref={dialog}
          aria-label={`Photo ${index! + 1} of ${photos.length}: ${open.name}`}
          className="m-0 h-full max-h-none w-full max-w-none bg-ink-900/95 p-0 text-white backdrop:bg-ink-900/80"
          onCancel={(e) => { e.preventDefault(); close(); }}
          onKeyDown={(e) => {
            if (e.key === 'ArrowRight') { e.preventDefault(); move(1); }
            else if (e.key === 'ArrowLeft') { e.preventDefault(); move(-1); }
            else if (e.key === '+' || e.key === '=') setZoom((z) => Math.min(ZOOMS.length - 1, z + 1));
            else if (e.key === '-') setZoom((z) => Math.max(0, z - 1));
          }}
          data-testid="photo-lightbox"
        >
          <div className="flex h-full flex-col">
            <div className="flex flex-wrap items-center gap-2 p-3 text-sm">
              <p className="mr-auto min-w-0 truncate">
                <span className="num">{index! + 1} / {photos.length}</span> · {open.name} · {open.capturedAt ? `captured ${open.capturedAt.replace('T', ' ')}` : 'no capture time'}
              </p>
              <button type="button" className="btn-quiet bg-white/10 px-3 py-1 text-white" onClick={() => setZoom((z) => Math.max(0, z - 1))} disabled={zoom === 0} aria-label="Zoom out">−</button>
              <span className="num w-10 text-center" aria-live="polite">{ZOOMS[zoom]}×</span>
              <button type="button" className="btn-quiet bg-white/10 px-3 py-1 text-white" onClick={() => setZoom((z) => Math.min(ZOOMS.length - 1, z + 1))} disabled={zoom === ZOOMS.length - 1} aria-label="Zoom in">+</button>
              {photos.length > 1 && (
                <>
                  <button type="button" className="btn-quiet bg-white/10 px-3 py-1 text-white" onClick={() => move(-1)} aria-label="Previous photo">←</button>
                  <button type="button" className="btn-quiet bg-white/10 px-3 py-1 text-white" onClick={() => move(1)} aria-label="Next photo">→</button>
                </>
              )}
              <button type="button" className="btn-quiet bg-white/10 px-3 py-1 text-white" onClick={close} autoFocus>Close</button>
            </div>
            <div className={`min-h-0 flex-1 ${zoom ? 'overflow-auto' : 'flex items-center justify-center overflow-hidden'} p-3`}>
              {/* eslint-disable-next-line @next/next/no-img-element */}
              <img
                src={open.url}
                alt={open.name}
                onClick={() => setZoom((z) => (z + 1) % ZOOMS.length)}
                className={zoom ? 'max-w-none cursor-zoom-out' : 'max-h-full max-w-full cursor-zoom-in rounded object-contain'}
                style={zoom ? { width: `${ZOOMS[zoom] * 100}%` } : undefined}
                data-testid="photo-full"
              />
            </div>
          </div>
        </dialog>
      )}
    </>
  );
}
