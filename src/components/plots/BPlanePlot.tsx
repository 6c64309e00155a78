// Interactive b-plane of one approach on a canvas: capture disk and planet to scale (one scale on both axes), linear
// 1- and 3-sigma ellipses, nominal point, Monte Carlo clones (thousands of points). Wheel or buttons to zoom, drag
// to pan, double-click to fit. Drawing is batched per animation frame.
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { AssessmentResult } from '../../../shared/schemas/assessment';
import { bPlaneBounds, bPlaneData, ellipsePoints, niceTicks, PLOT_COLORS as C, tickLabel, type BPlaneBounds } from '../../../shared/plots';
import { DISTANCE_UNITS } from '../../../shared/format';

type View = { cx: number; cy: number; pxPerKm: number };
const M = { left: 78, right: 16, top: 12, bottom: 46 };

function viewFor(b: BPlaneBounds, w: number, h: number): View {
  const pw = w - M.left - M.right, ph = h - M.top - M.bottom;
  const dx = b.xiMaxKm - b.xiMinKm || 1, dy = b.zetaMaxKm - b.zetaMinKm || 1;
  return { cx: (b.xiMinKm + b.xiMaxKm) / 2, cy: (b.zetaMinKm + b.zetaMaxKm) / 2, pxPerKm: Math.min(pw / dx, ph / dy) };
}

export function BPlanePlot({ result, approachIndex, unit, caption }: { result: AssessmentResult; approachIndex: number; unit: 'km' | 're'; caption: string }) {
  const data = useMemo(() => bPlaneData(result, approachIndex), [result, approachIndex]);
  const wrapRef = useRef<HTMLDivElement>(null);
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const [size, setSize] = useState({ w: 640, h: 520 });
  const [view, setView] = useState<View | null>(null);
  const [cursor, setCursor] = useState<{ xi: number; zeta: number } | null>(null);
  const frame = useRef(0);
  const drag = useRef<{ x: number; y: number; v: View } | null>(null);

  useEffect(() => {
    const el = wrapRef.current;
    if (!el) return;
    const ro = new ResizeObserver(() => {
      const w = Math.max(320, Math.floor(el.clientWidth));
      setSize({ w, h: Math.min(560, Math.max(360, Math.round(w * 0.72))) });
    });
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  const fit = useCallback((mode: 'fit' | 'capture') => setView(viewFor(bPlaneBounds(data, mode), size.w, size.h)), [data, size]);
  useEffect(() => fit('fit'), [fit]);

  const uKm = unit === 're' ? DISTANCE_UNITS.re.km : 1;

  const draw = useCallback(() => {
    const canvas = canvasRef.current;
    if (!canvas || !view) return;
    const dpr = window.devicePixelRatio || 1;
    const { w, h } = size;
    if (canvas.width !== Math.round(w * dpr)) canvas.width = Math.round(w * dpr);
    if (canvas.height !== Math.round(h * dpr)) canvas.height = Math.round(h * dpr);
    const ctx = canvas.getContext('2d')!;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, w, h);
    const box = { x: M.left, y: M.top, w: w - M.left - M.right, h: h - M.top - M.bottom };
    const X = (xi: number) => box.x + box.w / 2 + (xi - view.cx) * view.pxPerKm;
    const Y = (z: number) => box.y + box.h / 2 - (z - view.cy) * view.pxPerKm;
    const xi0 = view.cx - box.w / 2 / view.pxPerKm, xi1 = view.cx + box.w / 2 / view.pxPerKm;
    const z0 = view.cy - box.h / 2 / view.pxPerKm, z1 = view.cy + box.h / 2 / view.pxPerKm;
    ctx.fillStyle = '#f8fafc';
    ctx.fillRect(box.x, box.y, box.w, box.h);
    ctx.font = '12px system-ui, sans-serif';
    ctx.fillStyle = C.text;
    ctx.strokeStyle = C.grid;
    ctx.lineWidth = 1;
    ctx.textAlign = 'center';
    for (const t of niceTicks(xi0 / uKm, xi1 / uKm, 7)) {
      const x = X(t * uKm);
      ctx.beginPath(); ctx.moveTo(x, box.y); ctx.lineTo(x, box.y + box.h); ctx.stroke();
      ctx.fillText(tickLabel(t), x, box.y + box.h + 15);
    }
    ctx.textAlign = 'right';
    for (const t of niceTicks(z0 / uKm, z1 / uKm, 6)) {
      const y = Y(t * uKm);
      ctx.beginPath(); ctx.moveTo(box.x, y); ctx.lineTo(box.x + box.w, y); ctx.stroke();
      ctx.fillText(tickLabel(t), box.x - 6, y + 4);
    }
    ctx.textAlign = 'center';
    const uLabel = unit === 're' ? 'Earth radii' : 'km';
    ctx.fillText(`ξ (${uLabel})`, box.x + box.w / 2, box.y + box.h + 34);
    ctx.save(); ctx.translate(14, box.y + box.h / 2); ctx.rotate(-Math.PI / 2); ctx.fillText(`ζ (${uLabel})`, 0, 0); ctx.restore();

    ctx.save();
    ctx.beginPath(); ctx.rect(box.x, box.y, box.w, box.h); ctx.clip();
    const ox = X(0), oy = Y(0);
    if (data.captureRadiusKm !== null) {
      ctx.beginPath(); ctx.arc(ox, oy, data.captureRadiusKm * view.pxPerKm, 0, 2 * Math.PI);
      ctx.fillStyle = C.captureFill; ctx.fill(); ctx.strokeStyle = C.capture; ctx.lineWidth = 1.5; ctx.stroke();
    }
    if (data.planetRadiusKm !== null) {
      ctx.beginPath(); ctx.arc(ox, oy, data.planetRadiusKm * view.pxPerKm, 0, 2 * Math.PI);
      ctx.setLineDash([3, 2]); ctx.strokeStyle = C.planet; ctx.lineWidth = 1; ctx.stroke(); ctx.setLineDash([]);
    }
    ctx.strokeStyle = C.planet; ctx.beginPath(); ctx.moveTo(ox - 5, oy); ctx.lineTo(ox + 5, oy); ctx.moveTo(ox, oy - 5); ctx.lineTo(ox, oy + 5); ctx.stroke();
    // Monte Carlo points: misses first, hits on top.
    ctx.fillStyle = C.mcMiss;
    for (const p of data.points) if (!p.impact) ctx.fillRect(X(p.xiKm) - 1, Y(p.zetaKm) - 1, 2, 2);
    ctx.fillStyle = C.mcHit;
    for (const p of data.points) if (p.impact) ctx.fillRect(X(p.xiKm) - 1.5, Y(p.zetaKm) - 1.5, 3, 3);
    if (data.nominal) {
      const n = data.nominal;
      for (const [e, color, dash, lw] of [[data.sigma3, C.sigma3, [6, 3], 1.5], [data.sigma1, C.sigma1, [], 1.8]] as const) {
        if (!e) continue;
        ctx.beginPath();
        ellipsePoints(n.xiKm, n.zetaKm, e, 360).forEach(([x, y], i) => (i ? ctx.lineTo(X(x), Y(y)) : ctx.moveTo(X(x), Y(y))));
        ctx.setLineDash([...dash]); ctx.strokeStyle = color; ctx.lineWidth = lw; ctx.stroke(); ctx.setLineDash([]);
      }
      ctx.beginPath(); ctx.arc(X(n.xiKm), Y(n.zetaKm), 3.5, 0, 2 * Math.PI); ctx.fillStyle = C.nominal; ctx.fill();
    }
    ctx.restore();
    ctx.strokeStyle = C.axis; ctx.lineWidth = 1; ctx.strokeRect(box.x + 0.5, box.y + 0.5, box.w - 1, box.h - 1);
  }, [data, size, view, unit, uKm]);

  useEffect(() => {
    cancelAnimationFrame(frame.current);
    frame.current = requestAnimationFrame(draw);
    return () => cancelAnimationFrame(frame.current);
  }, [draw]);

  const toKm = (ev: { clientX: number; clientY: number }, v: View) => {
    const r = canvasRef.current!.getBoundingClientRect();
    const box = { x: M.left, y: M.top, w: size.w - M.left - M.right, h: size.h - M.top - M.bottom };
    const px = ev.clientX - r.left, py = ev.clientY - r.top;
    return { xi: v.cx + (px - box.x - box.w / 2) / v.pxPerKm, zeta: v.cy - (py - box.y - box.h / 2) / v.pxPerKm };
  };
  const zoomAt = (factor: number, at?: { xi: number; zeta: number }) =>
    setView((v) => {
      if (!v) return v;
      const p = at ?? { xi: v.cx, zeta: v.cy };
      return { pxPerKm: v.pxPerKm * factor, cx: p.xi + (v.cx - p.xi) / factor, cy: p.zeta + (v.cy - p.zeta) / factor };
    });

  // Wheel zoom needs a non-passive listener to keep the page from scrolling.
  useEffect(() => {
    const c = canvasRef.current;
    if (!c) return;
    const onWheel = (ev: WheelEvent) => {
      ev.preventDefault();
      setView((v) => {
        if (!v) return v;
        const f = Math.exp(-ev.deltaY * 0.0015);
        const p = toKm(ev, v);
        return { pxPerKm: v.pxPerKm * f, cx: p.xi + (v.cx - p.xi) / f, cy: p.zeta + (v.cy - p.zeta) / f };
      });
    };
    c.addEventListener('wheel', onWheel, { passive: false });
    return () => c.removeEventListener('wheel', onWheel);
  });

  const a = data.approach;
  const btn = 'rounded border border-rule bg-white px-2 py-0.5 text-xs hover:bg-accent-50';
  return (
    <figure className="space-y-2" data-testid="bplane-plot">
      <div className="flex flex-wrap items-center gap-2">
        <button type="button" className={btn} onClick={() => zoomAt(1.5)}>Zoom in</button>
        <button type="button" className={btn} onClick={() => zoomAt(1 / 1.5)}>Zoom out</button>
        <button type="button" className={btn} onClick={() => fit('fit')}>Fit all</button>
        <button type="button" className={btn} onClick={() => fit('capture')}>Capture disk</button>
        <span className="text-xs text-ink-soft tabular-nums" aria-live="off">
          {cursor ? `ξ ${tickLabel(Math.round(cursor.xi))} km, ζ ${tickLabel(Math.round(cursor.zeta))} km` : 'Wheel to zoom, drag to pan, double-click to fit'}
        </span>
      </div>
      <div ref={wrapRef} className="w-full">
        <canvas
          ref={canvasRef}
          data-testid="bplane-canvas"
          role="img"
          aria-label={`b-plane of the ${a.body} approach on ${a.utc.slice(0, 10)}: capture disk, linear 1 and 3 sigma ellipses${data.points.length ? `, ${data.points.length} Monte Carlo points` : ''}`}
          style={{ width: size.w, height: size.h, cursor: drag.current ? 'grabbing' : 'crosshair', touchAction: 'none' }}
          onPointerDown={(ev) => {
            if (!view) return;
            (ev.target as HTMLElement).setPointerCapture(ev.pointerId);
            drag.current = { x: ev.clientX, y: ev.clientY, v: view };
          }}
          onPointerMove={(ev) => {
            if (!view) return;
            const d = drag.current;
            if (d) setView({ ...d.v, cx: d.v.cx - (ev.clientX - d.x) / d.v.pxPerKm, cy: d.v.cy + (ev.clientY - d.y) / d.v.pxPerKm });
            else setCursor(toKm(ev, view));
          }}
          onPointerUp={() => (drag.current = null)}
          onPointerLeave={() => setCursor(null)}
          onDoubleClick={() => fit('fit')}
        />
      </div>
      <figcaption className="text-xs text-ink-soft">
        <span style={{ color: C.capture }}>●</span> capture disk r = {data.captureRadiusKm !== null ? `${tickLabel(Math.round(data.captureRadiusKm))} km` : 'n/a'} (planet radius with gravitational focusing at v∞ {a.vInfinityKmS?.toFixed(2) ?? '—'} km/s)
        {' · '}<span style={{ color: C.planet }}>◌</span> {a.body} radius
        {' · '}<span style={{ color: C.sigma1 }}>—</span> linear 1σ {' · '}<span style={{ color: C.sigma3 }}>- -</span> linear 3σ {' · '}● nominal
        {data.points.length > 0 ? <> · <span style={{ color: C.mcMiss }}>■</span> {data.points.length.toLocaleString('en-GB')} Monte Carlo clones (<span style={{ color: C.mcHit }}>■</span> hits)</> : ' · no Monte Carlo points in this run'}
        {!data.sigma1 && ' · no linear covariance at this approach'}
        <br />
        {caption}
      </figcaption>
    </figure>
  );
}
