/**
 * Planar geometry in projected metres: rings, polygons, bands from a centre line, discs. Everything here is
 * Euclidean on the map plane (never degrees), so areas and widths are those on the ground up to the CRS's
 * scale factor.
 */
export type Xy = [number, number];
export type Ring = Xy[];
/** Outer ring first, then holes. */
export type Polygon = Ring[];

/** Signed area of a ring [m²] (shoelace formula): positive when counter-clockwise (y up). */
export function ringArea(ring: readonly Xy[]): number {
  let a = 0;
  const n = ring.length;
  for (let i = 0; i < n; i++) {
    const [x0, y0] = ring[i];
    const [x1, y1] = ring[(i + 1) % n];
    a += x0 * y1 - x1 * y0;
  }
  return a / 2;
}

/** The ring without a repeated closing point. */
export function openRing(ring: readonly Xy[]): Ring {
  const n = ring.length;
  if (n > 1 && ring[0][0] === ring[n - 1][0] && ring[0][1] === ring[n - 1][1]) return ring.slice(0, n - 1) as Ring;
  return ring.slice() as Ring;
}

/** Outer ring counter-clockwise, holes clockwise (RFC 7946 §3.1.6 orientation), open rings. */
export function orientPolygon(poly: readonly (readonly Xy[])[]): Polygon {
  return poly.map((r, k) => {
    const ring = openRing(r);
    const a = ringArea(ring);
    const wantPositive = k === 0;
    return (a > 0) === wantPositive ? ring : ring.reverse();
  });
}

/** Area of a polygon with holes [m²] (outer minus holes). */
export function polygonArea(poly: Polygon): number {
  return orientPolygon(poly).reduce((s, r) => s + ringArea(r), 0);
}

/** Bounding box [xmin, ymin, xmax, ymax]. */
export function bbox(polys: readonly Polygon[]): [number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const p of polys) for (const r of p) for (const [x, y] of r) {
    if (x < x0) x0 = x;
    if (x > x1) x1 = x;
    if (y < y0) y0 = y;
    if (y > y1) y1 = y;
  }
  return [x0, y0, x1, y1];
}

/** A disc as a regular polygon of `n` vertices with the disc's area (circumradius chosen so the areas agree). */
export function discPolygon(cx: number, cy: number, radiusM: number, n = 128): Polygon {
  // A regular n-gon of circumradius R has area (n/2) R² sin(2π/n); matching πr² keeps areas exact.
  const R = radiusM * Math.sqrt((2 * Math.PI) / (n * Math.sin((2 * Math.PI) / n)));
  const ring: Ring = [];
  for (let k = 0; k < n; k++) {
    const t = (2 * Math.PI * k) / n;
    ring.push([cx + R * Math.cos(t), cy + R * Math.sin(t)]);
  }
  return [ring];
}

/** Why a centre line cannot make a band, or null. */
export type BandProblem = { index: number; message: string } | null;

/**
 * The band around a centre line: every point within widthM/2 of the line, measured across it, with flat
 * ends and mitred bends — a simple polygon of area exactly widthM × (length of the centre line).
 *
 * @remarks
 * Left and right offsets of each segment by ±w/2 along its unit normal; at an interior vertex the two
 * offset lines meet at the mitre point p ± (w/2)·m/(m·n₁), m the unit bisector of the normals n₁, n₂. The
 * band's area is Σ w·Lᵢ because each segment's piece is a trapezoid whose mid-line is the segment itself.
 * A bend too sharp for its segments (the inner mitre point falls beyond a neighbouring segment) would fold
 * the band over itself, and is refused.
 * @returns the polygon, or a problem naming the vertex
 */
export function bandPolygon(line: readonly Xy[], widthM: number): Polygon | { index: number; message: string } {
  const pts: Xy[] = [];
  for (const p of line) {
    const q = pts[pts.length - 1];
    if (!q || Math.hypot(p[0] - q[0], p[1] - q[1]) > 1e-6) pts.push([p[0], p[1]]);
  }
  if (pts.length < 2) return { index: 1, message: 'the centre line has no length (its points coincide)' };
  const h = widthM / 2;
  const normals: Xy[] = [];
  const lengths: number[] = [];
  for (let i = 0; i + 1 < pts.length; i++) {
    const dx = pts[i + 1][0] - pts[i][0];
    const dy = pts[i + 1][1] - pts[i][1];
    const L = Math.hypot(dx, dy);
    lengths.push(L);
    normals.push([-dy / L, dx / L]);
  }
  const left: Xy[] = [];
  const right: Xy[] = [];
  for (let i = 0; i < pts.length; i++) {
    let ox: number, oy: number;
    if (i === 0 || i === pts.length - 1) {
      const n = normals[i === 0 ? 0 : i - 1];
      ox = h * n[0];
      oy = h * n[1];
    } else {
      const n1 = normals[i - 1];
      const n2 = normals[i];
      const mx = n1[0] + n2[0];
      const my = n1[1] + n2[1];
      const ml = Math.hypot(mx, my);
      const cosHalf = ml / 2; // m·n₁ for the unit bisector
      if (cosHalf < Math.cos((75 * Math.PI) / 180)) return { index: i, message: 'the centre line turns back on itself here (a bend sharper than 150°)' };
      const reach = h / cosHalf; // distance from the vertex to the mitre point
      const along = Math.sqrt(Math.max(0, reach * reach - h * h)); // how far the mitre cuts into each segment
      if (along > Math.min(lengths[i - 1], lengths[i])) {
        return { index: i, message: `the bend is too sharp for a ${widthM} m band: the band would fold over itself (make the segments longer or the bend gentler)` };
      }
      ox = (h * mx) / ml / cosHalf;
      oy = (h * my) / ml / cosHalf;
    }
    left.push([pts[i][0] + ox, pts[i][1] + oy]);
    right.push([pts[i][0] - ox, pts[i][1] - oy]);
  }
  return orientPolygon([[...right, ...left.reverse()]]);
}

/** Length of a polyline [m]. */
export function lineLength(line: readonly Xy[]): number {
  let s = 0;
  for (let i = 0; i + 1 < line.length; i++) s += Math.hypot(line[i + 1][0] - line[i][0], line[i + 1][1] - line[i][1]);
  return s;
}
