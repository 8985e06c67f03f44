'use client';
/**
 * Top view of one layer of the inspected G-code, drawn on a canvas from the server's compact
 * preview JSON (lib/inspection/preview.ts). Layers are decoded lazily into one Path2D per flow
 * bucket and cached, so moving the slider redraws a few thousand line segments at most and a
 * 200-layer file stays smooth. The layer below is drawn faintly for context.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { FLOW_COLOURS, bucketLabel, flowColour, layerLabel, legendBands } from './flowScale';

interface PreviewLayer { zMm: number; paths: number[]; extrudedMm: number; peakFlowMm3s: number }
interface Preview {
  unitMm: number;
  toleranceMm: number;
  originMm: { x: number; y: number };
  sizeUnits: { x: number; y: number };
  focusUnits: { x0: number; y0: number; x1: number; y1: number };
  flowBucketsMm3s: number[];
  bucketLengthMm: number[];
  layers: PreviewLayer[];
  warnings: string[];
}

const CANVAS_PX = 520;

/** One Path2D per bucket for a layer, in grid units. */
function decode(layer: PreviewLayer, buckets: number): (Path2D | null)[] {
  const out: (Path2D | null)[] = new Array(buckets).fill(null);
  const p = layer.paths;
  let i = 0;
  while (i + 1 < p.length) {
    const b = Math.max(0, Math.min(buckets - 1, p[i]));
    const n = p[i + 1];
    i += 2;
    const path = (out[b] ??= new Path2D());
    let x = p[i];
    let y = p[i + 1];
    path.moveTo(x, y);
    i += 2;
    for (let k = 1; k < n && i + 1 < p.length; k++, i += 2) {
      x += p[i];
      y += p[i + 1];
      path.lineTo(x, y);
    }
  }
  return out;
}

/** `reportLayers`: the report's layer Z list and count, so the readout numbers layers as the report does. */
export function LayerPreview({ url, initialLayer, reportLayers = null }: { url: string; initialLayer?: number; reportLayers?: { zMm: number[]; count: number | null } | null }) {
  const [data, setData] = useState<Preview | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [bytes, setBytes] = useState(0);
  const [layer, setLayer] = useState(0);
  const [showBelow, setShowBelow] = useState(true);
  const [wholePlate, setWholePlate] = useState(false);
  const canvas = useRef<HTMLCanvasElement>(null);
  const cache = useRef(new Map<number, (Path2D | null)[]>());

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

  const paths = useCallback(
    (i: number) => {
      if (!data) return [];
      let v = cache.current.get(i);
      if (!v) {
        v = decode(data.layers[i], data.flowBucketsMm3s.length);
        cache.current.set(i, v);
      }
      return v;
    },
    [data],
  );

  useEffect(() => {
    const c = canvas.current;
    if (!c || !data || !data.layers.length) return;
    const ctx = c.getContext('2d');
    if (!ctx) return;
    const t0 = performance.now();
    const dpr = window.devicePixelRatio || 1;
    c.width = CANVAS_PX * dpr;
    c.height = CANVAS_PX * dpr;
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
    const scale = (c.width - 2 * margin) / span;
    // G-code Y grows away from the viewer; canvas Y grows downwards: flip so the view matches a top view of the bed.
    const ox = margin + ((span - w) * scale) / 2 - frame.x0 * scale;
    const oy = c.height - margin - ((span - h) * scale) / 2 + frame.y0 * scale;
    ctx.setTransform(scale, 0, 0, -scale, ox, oy);
    // Nominal bead width of ~0.45 mm, at least one device pixel.
    ctx.lineWidth = Math.max(0.45 / data.unitMm, 1 / scale);
    ctx.lineJoin = 'round';
    ctx.lineCap = 'round';
    if (showBelow && layer > 0) {
      ctx.globalAlpha = 0.18;
      ctx.strokeStyle = '#cfd6dc';
      for (const p of paths(layer - 1)) if (p) ctx.stroke(p);
    }
    ctx.globalAlpha = 1;
    paths(layer).forEach((p, b) => {
      if (!p) return;
      ctx.strokeStyle = flowColour(b);
      ctx.stroke(p);
    });
    // Decode + draw time of this layer, kept on the element so a browser test can report it.
    const ms = performance.now() - t0;
    c.dataset.drawMs = ms.toFixed(2);
    c.dataset.drawMsMax = Math.max(ms, Number(c.dataset.drawMsMax ?? 0)).toFixed(2);
    c.dataset.drawMsSum = (ms + Number(c.dataset.drawMsSum ?? 0)).toFixed(2);
    c.dataset.draws = String(1 + Number(c.dataset.draws ?? 0));
  }, [data, layer, showBelow, wholePlate, paths]);

  const current = data?.layers[layer];
  const usedBuckets = useMemo(() => (data ? legendBands(data.bucketLengthMm) : []), [data]);
  const readout = data && current ? layerLabel(current.zMm, layer, data.layers.length, reportLayers) : '';

  if (error) return <p className="field-error" role="alert">{error}</p>;
  if (!data) return <p className="text-sm text-ink-500" data-testid="preview-loading">Loading the toolpath preview…</p>;
  if (!data.layers.length) return <p className="text-sm text-ink-600">The G-code has no extruding moves to show.</p>;
  return (
    <div className="flex flex-wrap gap-6" data-testid="layer-preview">
      <div>
        <canvas ref={canvas} style={{ width: CANVAS_PX, height: CANVAS_PX }} className="rounded-lg border border-ink-200" role="img" aria-label={`Top view of layer ${layer + 1} at Z ${current?.zMm} mm, coloured by commanded flow`} data-testid="preview-canvas" />
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
            className="w-72 accent-ember-600"
            aria-valuetext={`${readout}, Z ${current?.zMm} mm`}
            data-testid="layer-slider"
          />
          <button type="button" className="btn-quiet px-2 py-1" onClick={() => setLayer((l) => Math.min(data.layers.length - 1, l + 1))} aria-label="Next layer">▶</button>
        </div>
        <p className="num mt-2 text-sm text-ink-700" data-testid="layer-readout">
          {readout} · Z {current?.zMm.toFixed(2)} mm · peak {current?.peakFlowMm3s.toFixed(1)} mm³/s · {current ? (current.extrudedMm / 1000).toFixed(2) : 0} m extruded
        </p>
        <label className="mt-1 flex items-center gap-2 text-sm text-ink-600">
          <input type="checkbox" checked={showBelow} onChange={(e) => setShowBelow(e.target.checked)} /> Show the layer below
        </label>
        <label className="mt-1 flex items-center gap-2 text-sm text-ink-600">
          <input type="checkbox" checked={wholePlate} onChange={(e) => setWholePlate(e.target.checked)} /> Frame everything printed (skirt, brim, prime line)
        </label>
      </div>
      <div className="min-w-44">
        <h3 className="text-sm font-semibold text-ink-700">Commanded flow, mm³/s</h3>
        <ul className="mt-2 space-y-1 text-sm" data-testid="flow-legend">
          {usedBuckets.map(({ i, len }) => (
            <li key={i} className={`flex items-center gap-2${len > 0 ? '' : ' opacity-50'}`}>
              <span className="inline-block h-3 w-6 rounded-sm" style={{ background: FLOW_COLOURS[Math.min(i, FLOW_COLOURS.length - 1)] }} aria-hidden />
              <span className="num">{bucketLabel(data.flowBucketsMm3s, i)}</span>
              <span className="num text-xs text-ink-500">{(len / 1000).toFixed(1)} m</span>
            </li>
          ))}
        </ul>
        <p className="mt-3 text-xs text-ink-500">Preview data {(bytes / 1024).toFixed(0)} KB · paths simplified to {data.toleranceMm} mm.</p>
        {data.warnings.map((w) => <p key={w} className="mt-1 text-xs text-ember-800">{w}</p>)}
      </div>
    </div>
  );
}
