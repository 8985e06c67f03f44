'use client';
/**
 * 3-D view of a range of layers of the toolpath preview, for judges who want to look around the
 * part: every record drawn as line segments at its layer's Z, coloured as in the top view. Drag to
 * turn, wheel or pinch to zoom, right-drag to pan (three.js OrbitControls). Loaded with next/dynamic
 * from LayerPreview only when opened, so three.js is in no page's first-load JavaScript.
 */
import { Canvas, useThree } from '@react-three/fiber';
import { useEffect, useMemo, useState } from 'react';
import { BufferAttribute, BufferGeometry, Color } from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { Preview } from './previewTypes';

/** Most line segments drawn at once; a wider range asks the judge to narrow it. */
const MAX_SEGMENTS = 1_500_000;
/** Layers shown when the view opens: up to this many, ending at the layer on the top view. */
const DEFAULT_SPAN = 40;

function webglAvailable(): boolean {
  try {
    const c = document.createElement('canvas');
    return !!(c.getContext('webgl2') || c.getContext('webgl'));
  } catch {
    return false;
  }
}

function Controls({ target }: { target: [number, number, number] }) {
  const { camera, gl, invalidate } = useThree();
  useEffect(() => {
    const c = new OrbitControls(camera, gl.domElement);
    c.target.set(...target);
    c.update();
    const onChange = () => invalidate();
    c.addEventListener('change', onChange);
    return () => {
      c.removeEventListener('change', onChange);
      c.dispose();
    };
  }, [camera, gl, invalidate, target]);
  return null;
}

export default function Preview3D({ data, layer, colourOf, modeLabel }: {
  data: Preview;
  layer: number;
  /** Colour of record k of layer li (bucket: its flow bucket). */
  colourOf: (li: number, k: number, bucket: number) => string;
  modeLabel: string;
}) {
  const last = data.layers.length - 1;
  const [from, setFrom] = useState(Math.max(0, layer - DEFAULT_SPAN + 1));
  const [to, setTo] = useState(layer);
  const [gl] = useState(webglAvailable);
  const lo = Math.min(from, to);
  const hi = Math.max(from, to);

  const built = useMemo(() => {
    let segments = 0;
    for (let li = lo; li <= hi; li++) {
      const p = data.layers[li].paths;
      for (let i = 0; i + 1 < p.length; ) {
        const n = p[i + 1];
        segments += Math.max(0, n - 1);
        i += 2 + 2 * n;
      }
    }
    if (segments > MAX_SEGMENTS) return { geometry: null, segments };
    const pos = new Float32Array(segments * 6);
    const col = new Float32Array(segments * 6);
    const colour = new Color();
    const u = data.unitMm;
    // Centre the part on the origin so the view turns around it.
    const cx = ((data.focusUnits.x0 + data.focusUnits.x1) / 2) * u;
    const cy = ((data.focusUnits.y0 + data.focusUnits.y1) / 2) * u;
    let w = 0;
    for (let li = lo; li <= hi; li++) {
      const l = data.layers[li];
      const p = l.paths;
      let k = 0;
      for (let i = 0; i + 1 < p.length; k++) {
        const bucket = p[i];
        const n = p[i + 1];
        colour.set(colourOf(li, k, bucket));
        let x = p[i + 2];
        let y = p[i + 3];
        for (let j = 1; j < n; j++) {
          const nx = x + p[i + 2 + 2 * j];
          const ny = y + p[i + 3 + 2 * j];
          // three.js is Y-up: bed X → X, bed Y → −Z, print Z → Y.
          pos.set([x * u - cx, l.zMm, -(y * u - cy), nx * u - cx, l.zMm, -(ny * u - cy)], w * 6);
          col.set([colour.r, colour.g, colour.b, colour.r, colour.g, colour.b], w * 6);
          w++;
          x = nx;
          y = ny;
        }
        i += 2 + 2 * n;
      }
    }
    const geometry = new BufferGeometry();
    geometry.setAttribute('position', new BufferAttribute(pos, 3));
    geometry.setAttribute('color', new BufferAttribute(col, 3));
    return { geometry, segments };
  }, [data, lo, hi, colourOf]);

  useEffect(() => () => built.geometry?.dispose(), [built]);

  const u = data.unitMm;
  const span = Math.max((data.focusUnits.x1 - data.focusUnits.x0) * u, (data.focusUnits.y1 - data.focusUnits.y0) * u, 10);
  const midZ = (data.layers[lo].zMm + data.layers[hi].zMm) / 2;
  const target = useMemo<[number, number, number]>(() => [0, midZ, 0], [midZ]);

  return (
    <div className="mt-3 space-y-3" data-testid="preview-3d">
      <div className="flex flex-wrap items-end gap-4 text-sm">
        <label className="flex flex-col">
          <span className="label">From layer</span>
          <input type="number" className="input w-24" min={1} max={last + 1} value={from + 1} onChange={(e) => setFrom(Math.max(0, Math.min(last, Number(e.target.value) - 1 || 0)))} data-testid="range-from" />
        </label>
        <label className="flex flex-col">
          <span className="label">To layer</span>
          <input type="number" className="input w-24" min={1} max={last + 1} value={to + 1} onChange={(e) => setTo(Math.max(0, Math.min(last, Number(e.target.value) - 1 || 0)))} data-testid="range-to" />
        </label>
        <p className="num text-ink-600" data-testid="range-readout">
          Preview levels {lo + 1}–{hi + 1} of {last + 1} · Z {data.layers[lo].zMm.toFixed(2)}–{data.layers[hi].zMm.toFixed(2)} mm · {built.segments.toLocaleString('en')} segments · coloured by {modeLabel.toLowerCase()}
        </p>
      </div>
      {!gl ? (
        <p className="rounded-lg bg-ember-50 p-3 text-sm text-ember-800" role="status" data-testid="preview-3d-unavailable">
          This browser has WebGL turned off or unavailable, which the 3-D view needs. The top view above shows the same toolpaths layer by layer.
        </p>
      ) : !built.geometry ? (
        <p className="rounded-lg bg-ember-50 p-3 text-sm text-ember-800" role="status">
          {built.segments.toLocaleString('en')} line segments is more than the 3-D view draws at once ({MAX_SEGMENTS.toLocaleString('en')}): choose fewer layers.
        </p>
      ) : (
        <div className="aspect-square w-full max-w-[640px] overflow-hidden rounded-lg border border-ink-200 bg-[#161b20] sm:aspect-[4/3]">
          <Canvas frameloop="demand" camera={{ position: [span * 0.9, midZ + span * 0.8, span * 1.1], fov: 40, near: 0.1, far: span * 20 }}
            aria-label={`3-D view of layers ${lo + 1} to ${hi + 1}; drag to turn, scroll to zoom`} data-testid="preview-3d-canvas">
            <lineSegments geometry={built.geometry}>
              <lineBasicMaterial vertexColors />
            </lineSegments>
            <gridHelper args={[span * 1.5, 10, '#3b4650', '#283038']} position={[0, 0, 0]} />
            <Controls target={target} />
          </Canvas>
        </div>
      )}
      <p className="text-xs text-ink-500">Drag to turn, scroll or pinch to zoom, right-drag (two fingers) to pan.</p>
    </div>
  );
}
