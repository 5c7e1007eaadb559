/**
 * A sketch of the day's route drawn from coordinates alone (no map tiles, so it works without the
 * internet): the start as a square, each stop as a numbered circle, legs as straight lines.
 */
export interface SketchPoint {
  id: string;
  lat: number;
  lon: number;
  label: string;
  done?: boolean;
}

export function RouteSketch({ start, stops }: { start: { lat: number; lon: number; label: string }; stops: SketchPoint[] }) {
  const W = 360;
  const H = 220;
  const pad = 22;
  const all = [start, ...stops];
  const midLat = all.reduce((s, p) => s + p.lat, 0) / all.length;
  const k = Math.cos((midLat * Math.PI) / 180);
  const xs = all.map((p) => p.lon * k);
  const ys = all.map((p) => -p.lat);
  const minX = Math.min(...xs);
  const maxX = Math.max(...xs);
  const minY = Math.min(...ys);
  const maxY = Math.max(...ys);
  const span = Math.max(maxX - minX, maxY - minY, 1e-6);
  const scale = Math.min((W - 2 * pad) / Math.max(maxX - minX, span * 0.3), (H - 2 * pad) / Math.max(maxY - minY, span * 0.3));
  const ox = (W - (maxX - minX) * scale) / 2;
  const oy = (H - (maxY - minY) * scale) / 2;
  const raw = (p: { lat: number; lon: number }) => [ox + (p.lon * k - minX) * scale, oy + (-p.lat - minY) * scale] as const;
  // Stops at the same place (two units at one site) are nudged apart so each number shows.
  const placed: (readonly [number, number])[] = [];
  for (const p of all) {
    const [x0, y0] = raw(p);
    let [x, y] = [x0, y0];
    for (let n = 1; placed.some(([px, py]) => Math.hypot(px - x, py - y) < 20) && n < 40; n++) {
      const ring = Math.ceil(n / 4) * 22;
      const dir = n % 4;
      x = Math.min(Math.max(x0 + (dir === 1 ? ring : dir === 3 ? -ring : 0), 12), W - 12);
      y = Math.min(Math.max(y0 + (dir === 2 ? ring : dir === 0 ? -ring : 0), 12), H - 12);
    }
    placed.push([x, y] as const);
  }
  const at = new Map(all.map((p, i) => [p, placed[i]!]));
  const pt = (p: { lat: number; lon: number }) => at.get(p as SketchPoint) ?? raw(p);
  const path = all.map((p, i) => `${i ? 'L' : 'M'}${pt(p)[0].toFixed(1)},${pt(p)[1].toFixed(1)}`).join(' ');
  const [sx, sy] = pt(start);
  const description = `Route sketch: from ${start.label}, ${stops.map((s, i) => `${i + 1}. ${s.label}`).join(', ')}.`;
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      role="img"
      aria-label={description}
      className="h-auto w-full rounded-md border border-slate-line bg-frost"
    >
      <defs>
        <marker id="route-arrow" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="6" markerHeight="6" orient="auto-start-reverse">
          <path d="M0,0 L10,5 L0,10 z" fill="#5B6B7A" />
        </marker>
      </defs>
      {stops.length > 0 && <path d={path} fill="none" stroke="#5B6B7A" strokeWidth="2" strokeDasharray="6 4" />}
      {all.slice(1).map((p, i) => {
        const [x1, y1] = pt(all[i]!);
        const [x2, y2] = pt(p);
        return (
          <line key={`m${i}`} x1={x1} y1={y1} x2={(x1 + x2) / 2} y2={(y1 + y2) / 2} stroke="transparent" markerEnd="url(#route-arrow)" />
        );
      })}
      <rect x={sx - 8} y={sy - 8} width="16" height="16" rx="2" fill="#17212B" />
      <text x={sx} y={sy - 12} textAnchor="middle" fontSize="11" fill="#17212B">
        Start
      </text>
      {stops.map((s, i) => {
        const [x, y] = pt(s);
        return (
          <g key={s.id}>
            <circle cx={x} cy={y} r="12" fill={s.done ? '#2E7D4F' : '#B5562B'} stroke="white" strokeWidth="2" />
            <text x={x} y={y + 4} textAnchor="middle" fontSize="12" fontWeight="600" fill="white">
              {i + 1}
            </text>
          </g>
        );
      })}
    </svg>
  );
}
