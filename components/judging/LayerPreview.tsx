'use client';
/**
 * Top view of one layer of the inspected G-code, drawn on a canvas from the server's compact
 * preview JSON (lib/inspection/preview.ts), coloured by commanded flow, speed, line width or layer
 * time. Layers are decoded lazily into one Path2D per colour band and cached, so moving the slider
 * redraws a few thousand line segments at most and a 200-layer file stays smooth. The layer below
 * is drawn faintly for context. The canvas fits its column (a phone's width included). The 3-D
 * view of a layer range is a separate chunk (three.js), loaded only when the judge opens it.
 */
import dynamic from 'next/dynamic';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { FLOW_COLOURS, bucketLabel, flowColour, layerLabel, legendBands } from './flowScale';
import {
  PREVIEW_MODES, PREVIEW_MODE_LIST, NO_VALUE_COLOUR, bandColour, bandLabel, bandOf, layerTimes, niceBands, recordSpeedMms, recordWidthMm, robustRange, spreadColour,
  type PreviewMode,
} from './previewModes';
import type { Preview, PreviewLayer } from './previewTypes';

const Preview3D = dynamic(() => import('./Preview3D'), { ssr: false, loading: () => <p className="text-sm text-ink-500" data-testid="preview-3d-loading">Loading the 3-D view…</p> });

const CANVAS_MAX_PX = 520;

/** Walks a layer's records: bucket, point count and the offset of its first point, plus its length in grid units. */
function forEachRecord(layer: PreviewLayer, fn: (k: number, bucket: number, start: number, n: number, lenUnits: number) => void) {
  const p = layer.paths;
  let i = 0;
  let k = 0;
  while (i + 1 < p.length) {
    const bucket = p[i];
    const n = p[i + 1];
    const start = i + 2;
    let len = 0;
    for (let j = 1; j < n; j++) len += Math.hypot(p[start + 2 * j], p[start + 2 * j + 1]);
    fn(k++, bucket, start, n, len);
    i = start + 2 * n;
  }
}

/** What a mode needs to colour a record: a band index per record (-1 = no value) and the legend. */
export interface ModeScale {
  /** Band edges for speed/width/layer time; the flow mode uses the stored buckets. */
  edges: readonly number[];
  colour: (band: number) => string;
  /** Band of record k of layer li, -1 when the record has no value. */
  bandOf: (li: number, k: number, bucket: number) => number;
  legend: { band: number; label: string; amount: string }[];
  title: string;
  /** Why the mode is not available for this preview, or null. */
  missing: string | null;
}

function buildScale(mode: PreviewMode, data: Preview, times: (number | null)[]): ModeScale {
  const title = `${PREVIEW_MODES[mode].label}, ${PREVIEW_MODES[mode].unit}`;
  if (mode === 'flow') {
    return {
      edges: data.flowBucketsMm3s,
      colour: flowColour,
      bandOf: (_li, _k, bucket) => bucket,
      legend: legendBands(data.bucketLengthMm).map(({ i, len }) => ({ band: i, label: bucketLabel(data.flowBucketsMm3s, i), amount: `${(len / 1000).toFixed(1)} m` })),
      title,
      missing: null,
    };
  }
  if (mode === 'layerTime') {
    const known = times.filter((t): t is number => t !== null);
    if (!known.length) return { edges: [], colour: bandColour, bandOf: () => -1, legend: [], title, missing: 'The inspection report has no layer times for this file.' };
    const range = robustRange(known.map((v) => ({ v, w: 1 })))!;
    const edges = niceBands(range.min, range.max);
    const open = { low: range.below, high: range.above };
    const count = new Array<number>(edges.length).fill(0);
    for (const t of known) count[bandOf(edges, t)]++;
    return {
      edges,
      colour: (b) => spreadColour(b, edges.length),
      bandOf: (li) => (times[li] === null ? -1 : bandOf(edges, times[li]!)),
      legend: edges.map((_, i) => ({ band: i, label: bandLabel(edges, i, open), amount: `${count[i]} layer${count[i] === 1 ? '' : 's'}` })),
      title,
      missing: null,
    };
  }
  // Speed and line width: one value per record (format-3 previews).
  if (!data.layers.some((l) => l.props?.length)) {
    return { edges: [], colour: bandColour, bandOf: () => -1, legend: [], title, missing: 'This preview was kept before speeds and line widths were recorded: use “Inspect again” to colour by them.' };
  }
  const values: (number | null)[][] = data.layers.map((l) => {
    const out: (number | null)[] = [];
    if (!l.props) return out;
    forEachRecord(l, (k) => out.push(mode === 'speed' ? recordSpeedMms(l.props!, k) : recordWidthMm(l.props!, k, l.heightMm)));
    return out;
  });
  const weighted: { v: number; w: number }[] = [];
  data.layers.forEach((l, li) => forEachRecord(l, (k, _b, _s, _n, len) => {
    const v = values[li][k];
    if (v !== null && v !== undefined) weighted.push({ v, w: Math.max(len, 1) });
  }));
  const range = robustRange(weighted);
  if (!range) return { edges: [], colour: bandColour, bandOf: () => -1, legend: [], title, missing: 'This file has no extruding moves with a value to colour.' };
  const edges = niceBands(range.min, range.max);
  const open = { low: range.below, high: range.above };
  const lenMm = new Array<number>(edges.length).fill(0);
  for (const { v, w } of weighted) lenMm[bandOf(edges, v)] += w * data.unitMm;
  return {
    edges,
    colour: (b) => spreadColour(b, edges.length),
    bandOf: (li, k) => {
      const v = values[li]?.[k];
      return v === null || v === undefined ? -1 : bandOf(edges, v);
    },
    legend: edges.map((_, i) => ({ band: i, label: bandLabel(edges, i, open), amount: `${(lenMm[i] / 1000).toFixed(1)} m` })),
    title,
    missing: null,
  };
}

/** One Path2D per band (index 0 … n-1) plus the no-value path last, for one layer, in grid units. */
function decode(data: Preview, li: number, scale: ModeScale): (Path2D | null)[] {
  const n = Math.max(scale.edges.length, 1);
  const out: (Path2D | null)[] = new Array(n + 1).fill(null);
  const layer = data.layers[li];
  const p = layer.paths;
  forEachRecord(layer, (k, bucket, start, count) => {
    const b = scale.bandOf(li, k, bucket);
    const slot = b < 0 ? n : Math.min(n - 1, b);
    const path = (out[slot] ??= new Path2D());
    let x = p[start];
    let y = p[start + 1];
    path.moveTo(x, y);
    for (let j = 1; j < count; j++) {
      x += p[start + 2 * j];
      y += p[start + 2 * j + 1];
      path.lineTo(x, y);
    }
  });
  return out;
}

/** `reportLayers`: the report's layer Z list, count and per-layer times, so the readout numbers layers as the report does. */
export function LayerPreview({ url, initialLayer, reportLayers = null }: { url: string; initialLayer?: number; reportLayers?: { zMm: number[]; count: number | null; timeS?: number[] } | null }) {
  const [data, setData] = useState<Preview | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [bytes, setBytes] = useState(0);
  const [layer, setLayer] = useState(0);
  const [mode, setMode] = useState<PreviewMode>('flow');
  const [showBelow, setShowBelow] = useState(true);
  const [wholePlate, setWholePlate] = useState(false);
  const [show3d, setShow3d] = useState(false);
  const [sizePx, setSizePx] = useState(CANVAS_MAX_PX);
  const canvas = useRef<HTMLCanvasElement>(null);
  const box = useRef<HTMLDivElement>(null);
  const cache = useRef(new Map<string, (Path2D | null)[]>());

  useEffect(() => {
    let live = true;
    fetch(url)
      .then(async (res) => {
        const text = await res.text();
        if (!res.ok) throw new Error((JSON.parse(text) as { error?: string }).error ?? `The preview did not load (${res.status}).`);
        if (!live) return;
        const p = JSON.parse(text) as Preview;
        setBytes(text.length);
        setData(p);
        setLayer(Math.min(initialLayer ?? Math.floor(p.layers.length / 2), Math.max(0, p.layers.length - 1)));
      })
      .catch((e: Error) => live && setError(e.message));
    return () => {
      live = false;
    };
  }, [url, initialLayer]);

  // The canvas takes its column's width, up to CANVAS_MAX_PX (a phone gets a smaller square).
  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setSizePx(Math.max(200, Math.min(CANVAS_MAX_PX, Math.floor(el.clientWidth)))));
    ro.observe(el);
    return () => ro.disconnect();
  }, [data]);

  const times = useMemo(() => (data ? layerTimes(data.layers.map((l) => l.zMm), reportLayers?.timeS ? { zMm: reportLayers.zMm, timeS: reportLayers.timeS } : null) : []), [data, reportLayers]);
  const scale = useMemo(() => (data ? buildScale(mode, data, times) : null), [data, mode, times]);

  const paths = useCallback(
    (i: number) => {
      if (!data || !scale) return [];
      const key = `${mode}:${i}`;
      let v = cache.current.get(key);
      if (!v) {
        v = decode(data, i, scale);
        cache.current.set(key, v);
      }
      return v;
    },
    [data, scale, mode],
  );

  useEffect(() => {
    const c = canvas.current;
    if (!c || !data || !data.layers.length || !scale) return;
    const ctx = c.getContext('2d');
    if (!ctx) return;
    const t0 = performance.now();
    const dpr = window.devicePixelRatio || 1;
    c.width = sizePx * dpr;
    c.height = sizePx * dpr;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.fillStyle = '#161b20';
    ctx.fillRect(0, 0, c.width, c.height);
    const margin = 16 * dpr;
    // Frame the part (skirt, brim and prime line left out) unless the judge asks for everything printed.
    const f = data.focusUnits;
    const frame = wholePlate || !(f.x1 > f.x0 && f.y1 > f.y0)
      ? { x0: 0, y0: 0, x1: data.sizeUnits.x, y1: data.sizeUnits.y }
      : { x0: f.x0, y0: f.y0, x1: f.x1, y1: f.y1 };
    const w = frame.x1 - frame.x0;
    const h = frame.y1 - frame.y0;
    const span = Math.max(w, h, 1);
    const s = (c.width - 2 * margin) / span;
    // G-code Y grows away from the viewer; canvas Y grows downwards: flip so the view matches a top view of the bed.
    const ox = margin + ((span - w) * s) / 2 - frame.x0 * s;
    const oy = c.height - margin - ((span - h) * s) / 2 + frame.y0 * s;
    ctx.setTransform(s, 0, 0, -s, ox, oy);
    // Nominal bead width of ~0.45 mm, at least one device pixel.
    ctx.lineWidth = Math.max(0.45 / data.unitMm, 1 / s);
    ctx.lineJoin = 'round';
    ctx.lineCap = 'round';
    if (showBelow && layer > 0) {
      ctx.globalAlpha = 0.18;
      ctx.strokeStyle = '#cfd6dc';
      for (const p of paths(layer - 1)) if (p) ctx.stroke(p);
    }
    ctx.globalAlpha = 1;
    const list = paths(layer);
    list.forEach((p, b) => {
      if (!p) return;
      ctx.strokeStyle = b === list.length - 1 ? NO_VALUE_COLOUR : scale.colour(b);
      ctx.stroke(p);
    });
    // Decode + draw time of this layer, kept on the element so a browser test can report it.
    const ms = performance.now() - t0;
    c.dataset.drawMs = ms.toFixed(2);
    c.dataset.drawMsMax = Math.max(ms, Number(c.dataset.drawMsMax ?? 0)).toFixed(2);
    c.dataset.drawMsSum = (ms + Number(c.dataset.drawMsSum ?? 0)).toFixed(2);
    c.dataset.draws = String(1 + Number(c.dataset.draws ?? 0));
    c.dataset.mode = mode;
  }, [data, layer, showBelow, wholePlate, paths, scale, mode, sizePx]);

  // Stable per mode, so the 3-D view rebuilds its geometry only when the mode or range changes.
  const colourOf = useCallback(
    (li: number, k: number, bucket: number) => {
      const b = scale ? scale.bandOf(li, k, bucket) : -1;
      return b < 0 || !scale ? NO_VALUE_COLOUR : scale.colour(b);
    },
    [scale],
  );

  const current = data?.layers[layer];
  const readout = data && current ? layerLabel(current.zMm, layer, data.layers.length, reportLayers) : '';

  if (error) return <p className="field-error" role="alert">{error}</p>;
  if (!data || !scale) return <p className="text-sm text-ink-500" data-testid="preview-loading">Loading the toolpath preview…</p>;
  if (!data.layers.length) return <p className="text-sm text-ink-600">The G-code has no extruding moves to show.</p>;
  const layerTime = times[layer];
  return (
    <div className="space-y-4" data-testid="layer-preview">
      <fieldset className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm" data-testid="preview-modes">
        <legend className="sr-only">Colour the toolpaths by</legend>
        <span className="font-semibold text-ink-700" aria-hidden>Colour by:</span>
        {PREVIEW_MODE_LIST.map((m) => (
          <label key={m} className="flex items-center gap-1">
            <input type="radio" name="preview-mode" value={m} checked={mode === m} onChange={() => setMode(m)} /> {PREVIEW_MODES[m].label}
          </label>
        ))}
      </fieldset>
      <div className="flex flex-wrap gap-6">
        <div ref={box} className="w-full min-w-0 max-w-[520px] flex-1 basis-72">
          <canvas ref={canvas} style={{ width: sizePx, height: sizePx }} className="block max-w-full rounded-lg border border-ink-200" role="img"
            aria-label={`Top view of layer ${layer + 1} at Z ${current?.zMm} mm, coloured by ${PREVIEW_MODES[mode].label.toLowerCase()}`} data-testid="preview-canvas" />
          <div className="mt-3 flex items-center gap-3">
            <button type="button" className="btn-quiet px-2 py-1" onClick={() => setLayer((l) => Math.max(0, l - 1))} aria-label="Previous layer">◀</button>
            <label htmlFor="layer-slider" className="sr-only">Layer</label>
            <input
              id="layer-slider"
              type="range"
              min={0}
              max={data.layers.length - 1}
              value={layer}
              onChange={(e) => setLayer(Number(e.target.value))}
              className="min-w-0 flex-1 accent-ember-600"
              aria-valuetext={`${readout}, Z ${current?.zMm} mm`}
              data-testid="layer-slider"
            />
            <button type="button" className="btn-quiet px-2 py-1" onClick={() => setLayer((l) => Math.min(data.layers.length - 1, l + 1))} aria-label="Next layer">▶</button>
          </div>
          <p className="num mt-2 text-sm text-ink-700" data-testid="layer-readout">
            {readout} · Z {current?.zMm.toFixed(2)} mm · peak {current?.peakFlowMm3s.toFixed(1)} mm³/s · {current ? (current.extrudedMm / 1000).toFixed(2) : 0} m extruded{layerTime != null ? ` · ${layerTime.toFixed(1)} s` : ''}
          </p>
          <label className="mt-1 flex items-center gap-2 text-sm text-ink-600">
            <input type="checkbox" checked={showBelow} onChange={(e) => setShowBelow(e.target.checked)} /> Show the layer below
          </label>
          <label className="mt-1 flex items-center gap-2 text-sm text-ink-600">
            <input type="checkbox" checked={wholePlate} onChange={(e) => setWholePlate(e.target.checked)} /> Frame everything printed (skirt, brim, prime line)
          </label>
        </div>
        <div className="min-w-44">
          <h3 className="text-sm font-semibold text-ink-700" data-testid="legend-title">{scale.title}</h3>
          {scale.missing ? <p className="mt-2 max-w-56 text-sm text-ink-600" data-testid="mode-missing">{scale.missing}</p> : (
            <ul className="mt-2 space-y-1 text-sm" data-testid={mode === 'flow' ? 'flow-legend' : 'mode-legend'}>
              {scale.legend.map(({ band, label, amount }) => (
                <li key={band} className={`flex items-center gap-2${amount.startsWith('0.0 m') || amount.startsWith('0 layers') ? ' opacity-50' : ''}`}>
                  <span className="inline-block h-3 w-6 rounded-sm" style={{ background: mode === 'flow' ? FLOW_COLOURS[Math.min(band, FLOW_COLOURS.length - 1)] : scale.colour(band) }} aria-hidden />
                  <span className="num">{label}</span>
                  <span className="num text-xs text-ink-500">{amount}</span>
                </li>
              ))}
            </ul>
          )}
          {mode !== 'flow' && !scale.missing && <p className="mt-2 text-xs text-ink-500">Grey: no value (e.g. a prime line the report does not count).</p>}
          <p className="mt-3 text-xs text-ink-500">Preview data {(bytes / 1024).toFixed(0)} KB · paths simplified to {data.toleranceMm} mm.</p>
          {data.warnings.map((w) => <p key={w} className="mt-1 text-xs text-ember-800">{w}</p>)}
        </div>
      </div>
      <div>
        <button type="button" className="btn-quiet" aria-expanded={show3d} onClick={() => setShow3d((v) => !v)} data-testid="toggle-3d">
          {show3d ? 'Close the 3-D view' : 'Open the 3-D view of a layer range'}
        </button>
        {show3d && <Preview3D data={data} layer={layer} colourOf={colourOf} modeLabel={PREVIEW_MODES[mode].label} />}
      </div>
    </div>
  );
}
