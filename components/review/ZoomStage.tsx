'use client';
/**
 * A photo you can zoom and pan with a finger, two fingers, a mouse or the keyboard. Everything inside is drawn
 * in the photo's own frame (image px, origin top-left, +y down): the SVG's viewBox is the part of the photo in
 * view, so marks stay on their holes at any zoom. Pointer events only (one API for touch, pen and mouse); a
 * tap (a press that moves less than a few screen px) is passed to `onTap` with its image position.
 */
import { useCallback, useEffect, useRef, useState, type ReactNode } from 'react';


export interface View { x: number; y: number; w: number; h: number }
export interface StageApi {
  /** Screen (client) px → image px. */
  toImage: (clientX: number, clientY: number) => { x: number; y: number };
  /** Image px per screen px at the current zoom (to size marks in screen terms). */
  pxPerScreen: number;
}

const TAP_SLOP = 6;

export function ZoomStage({ widthPx, heightPx, href, children, onTap, label, className }: {
  widthPx: number;
  heightPx: number;
  href: string | null;
  children: (api: StageApi) => ReactNode;
  onTap?: (p: { x: number; y: number }, api: StageApi) => void;
  label: string;
  className?: string;
}) {
  const [svgEl, setSvgEl] = useState<SVGSVGElement | null>(null);
  const full: View = { x: 0, y: 0, w: widthPx, h: heightPx };
  const [view, setView] = useState<View>(full);
  const [boxW, setBoxW] = useState(800);
  const pointers = useRef(new Map<number, { x: number; y: number }>());
  const gesture = useRef<{ startView: View; start: Map<number, { x: number; y: number }>; moved: boolean; target: EventTarget | null } | null>(null);

  useEffect(() => {
    const el = svgEl;
    if (!el) return;
    const ro = new ResizeObserver(() => setBoxW(el.getBoundingClientRect().width || 800));
    ro.observe(el);
    return () => ro.disconnect();
  }, [svgEl]);

  const toImage = useCallback((cx: number, cy: number) => {
    const el = svgEl;
    if (!el) return { x: 0, y: 0 };
    const r = el.getBoundingClientRect();
    // preserveAspectRatio="xMidYMid meet": uniform scale, centred
    const s = Math.min(r.width / view.w, r.height / view.h);
    const ox = r.left + (r.width - view.w * s) / 2, oy = r.top + (r.height - view.h * s) / 2;
    return { x: view.x + (cx - ox) / s, y: view.y + (cy - oy) / s };
  }, [view, svgEl]);

  const clamp = useCallback((v: View): View => {
    const w = Math.min(Math.max(v.w, widthPx / 40), widthPx * 1.2);
    const h = w * (heightPx / widthPx);
    const x = Math.min(Math.max(v.x, -0.1 * widthPx), widthPx * 1.1 - w);
    const y = Math.min(Math.max(v.y, -0.1 * heightPx), heightPx * 1.1 - h);
    return { x, y, w, h };
  }, [widthPx, heightPx]);

  const zoomAt = useCallback((factor: number, at?: { x: number; y: number }) => {
    setView((v) => {
      const c = at ?? { x: v.x + v.w / 2, y: v.y + v.h / 2 };
      const w = v.w / factor, h = v.h / factor;
      return clamp({ x: c.x - (c.x - v.x) / factor, y: c.y - (c.y - v.y) / factor, w, h });
    });
  }, [clamp]);

  useEffect(() => {
    const el = svgEl;
    if (!el) return;
    const onWheel = (e: WheelEvent) => {
      e.preventDefault();
      zoomAt(e.deltaY < 0 ? 1.25 : 0.8, toImage(e.clientX, e.clientY));
    };
    el.addEventListener('wheel', onWheel, { passive: false });
    return () => el.removeEventListener('wheel', onWheel);
  }, [toImage, zoomAt, svgEl]);

  const onPointerDown = (e: React.PointerEvent<SVGSVGElement>) => {
    if ((e.target as Element).closest('[data-drag]')) return; // handles drag themselves
    try { svgEl?.setPointerCapture(e.pointerId); } catch { /* a pointer that is already gone */ }
    pointers.current.set(e.pointerId, { x: e.clientX, y: e.clientY });
    gesture.current = { startView: view, start: new Map(pointers.current), moved: false, target: e.target };
  };
  const onPointerMove = (e: React.PointerEvent<SVGSVGElement>) => {
    if (!pointers.current.has(e.pointerId) || !gesture.current) return;
    pointers.current.set(e.pointerId, { x: e.clientX, y: e.clientY });
    const g = gesture.current;
    const el = e.currentTarget;
    const r = el.getBoundingClientRect();
    const s = Math.min(r.width / g.startView.w, r.height / g.startView.h);
    const pts = [...pointers.current.values()];
    const starts = [...pointers.current.keys()].map((id) => g.start.get(id) ?? pointers.current.get(id)!);
    if (pts.length === 1) {
      const dx = pts[0]!.x - starts[0]!.x, dy = pts[0]!.y - starts[0]!.y;
      if (Math.hypot(dx, dy) > TAP_SLOP) g.moved = true;
      if (g.moved) setView(clamp({ ...g.startView, x: g.startView.x - dx / s, y: g.startView.y - dy / s }));
    } else if (pts.length >= 2) {
      g.moved = true;
      const d0 = Math.hypot(starts[0]!.x - starts[1]!.x, starts[0]!.y - starts[1]!.y) || 1;
      const d1 = Math.hypot(pts[0]!.x - pts[1]!.x, pts[0]!.y - pts[1]!.y) || 1;
      const f = d1 / d0;
      const m0 = { x: (starts[0]!.x + starts[1]!.x) / 2, y: (starts[0]!.y + starts[1]!.y) / 2 };
      const m1 = { x: (pts[0]!.x + pts[1]!.x) / 2, y: (pts[0]!.y + pts[1]!.y) / 2 };
      const ox = r.left + (r.width - g.startView.w * s) / 2, oy = r.top + (r.height - g.startView.h * s) / 2;
      const anchor = { x: g.startView.x + (m0.x - ox) / s, y: g.startView.y + (m0.y - oy) / s };
      const w = g.startView.w / f, h = g.startView.h / f;
      const s1 = s * f;
      setView(clamp({ x: anchor.x - (m1.x - ox) / s1, y: anchor.y - (m1.y - oy) / s1, w, h }));
    }
  };
  const onPointerUp = (e: React.PointerEvent<SVGSVGElement>) => {
    const g = gesture.current;
    const wasSingle = pointers.current.size === 1;
    pointers.current.delete(e.pointerId);
    if (g && wasSingle && !g.moved && onTap) onTap(toImage(e.clientX, e.clientY), { toImage, pxPerScreen: view.w / Math.max(1, boxW) });
    if (pointers.current.size === 0) gesture.current = null;
    else gesture.current = { startView: view, start: new Map(pointers.current), moved: true, target: null };
  };

  const pxPerScreen = view.w / Math.max(1, boxW);
  const step = (dx: number, dy: number) => setView((v) => clamp({ ...v, x: v.x + dx * v.w, y: v.y + dy * v.h }));
  return (
    <div className={`flex flex-col gap-2 ${className ?? ''}`}>
      <div className="no-print flex flex-wrap gap-2" role="toolbar" aria-label="Zoom">
        <button type="button" className="btn btn-quiet" onClick={() => zoomAt(1.6)} aria-label="Zoom in">+</button>
        <button type="button" className="btn btn-quiet" onClick={() => zoomAt(1 / 1.6)} aria-label="Zoom out">−</button>
        <button type="button" className="btn btn-quiet" onClick={() => setView(full)}>Whole photo</button>
        <span className="self-center text-sm text-muted">{Math.round((widthPx / view.w) * 100)} % · drag to move, pinch or wheel to zoom</span>
      </div>
      <svg
        ref={setSvgEl}
        viewBox={`${view.x} ${view.y} ${view.w} ${view.h}`}
        preserveAspectRatio="xMidYMid meet"
        className="gp-touch-none block w-full rounded-lg border border-line bg-black"
        style={{ aspectRatio: `${widthPx} / ${heightPx}`, maxHeight: '80vh' }}
        role="img"
        aria-label={label}
        tabIndex={0}
        onPointerDown={onPointerDown}
        onPointerMove={onPointerMove}
        onPointerUp={onPointerUp}
        onPointerCancel={onPointerUp}
        onKeyDown={(e) => {
          const k = e.key;
          if (k === '+' || k === '=') zoomAt(1.25);
          else if (k === '-') zoomAt(0.8);
          else if (k === 'ArrowLeft') step(-0.1, 0);
          else if (k === 'ArrowRight') step(0.1, 0);
          else if (k === 'ArrowUp') step(0, -0.1);
          else if (k === 'ArrowDown') step(0, 0.1);
          else return;
          e.preventDefault();
        }}
      >
        {href ? <image href={href} x={0} y={0} width={widthPx} height={heightPx} preserveAspectRatio="none" /> : <rect x={0} y={0} width={widthPx} height={heightPx} fill="#333" />}
        {children({ toImage, pxPerScreen })}
      </svg>
    </div>
  );
}
