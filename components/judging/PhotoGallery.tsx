'use client';
/** Entry photos as thumbnails; a click opens the full-size photo (a view the server audits). */
import { useEffect, useState } from 'react';

export interface GalleryPhoto { id: number; name: string; capturedAt: string | null; url: string; thumbUrl: string }

export function PhotoGallery({ photos }: { photos: GalleryPhoto[] }) {
  const [open, setOpen] = useState<GalleryPhoto | null>(null);
  useEffect(() => {
    if (!open) return;
    const onKey = (e: KeyboardEvent) => e.key === 'Escape' && setOpen(null);
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [open]);
  if (!photos.length) return <p className="text-sm text-ink-600">No photos were uploaded.</p>;
  return (
    <>
      <ul className="flex flex-wrap gap-4" data-testid="photos">
        {photos.map((p) => (
          <li key={p.id} className="w-44">
            <button type="button" onClick={() => setOpen(p)} className="block w-full cursor-zoom-in rounded-lg border border-ink-200 bg-ink-50 p-1" aria-label={`Open ${p.name} at full size`}>
              {/* eslint-disable-next-line @next/next/no-img-element -- private, access-checked files are not for the image optimizer */}
              <img src={p.thumbUrl} alt={p.name} className="h-32 w-full rounded object-cover" loading="lazy" />
            </button>
            <p className="mt-1 truncate text-xs text-ink-600">{p.name}</p>
            <p className="num text-xs text-ink-500">{p.capturedAt ? `captured ${p.capturedAt.replace('T', ' ')}` : 'no capture time in the file'}</p>
          </li>
        ))}
      </ul>
      {open && (
        <div role="dialog" aria-modal="true" aria-label={open.name} className="fixed inset-0 z-50 flex flex-col items-center justify-center bg-ink-900/90 p-6" onClick={() => setOpen(null)}>
          {/* eslint-disable-next-line @next/next/no-img-element */}
          <img src={open.url} alt={open.name} className="max-h-[85vh] max-w-full rounded" data-testid="photo-full" />
          <p className="mt-3 text-sm text-white">{open.name} · {open.capturedAt ? `captured ${open.capturedAt.replace('T', ' ')}` : 'no capture time'}</p>
          <button type="button" className="btn-quiet mt-3" onClick={() => setOpen(null)} autoFocus>Close</button>
        </div>
      )}
    </>
  );
}
