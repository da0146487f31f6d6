/**
 * The band's cross-section: the 1-D transect analysis along the band's normal (host forest — band — host
 * forest at the stocking around the band), whose critical width (the narrowest band that pins a front in
 * 1-D, bisection on full-model runs; see analysis/verdict/barrier.ts) is reported beside the 2-D result, stated as
 * a 1-D result: in 2-D a band can also be bypassed around its ends, and a curved front meets it differently.
 */
import type { RasterLandscape } from '../../domain/raster.ts';
import { parseScenario, pointScenario } from '../../model/scenario.ts';
import { InputError } from '../../model/errors.ts';
import { criticalWidth } from '../verdict/barrier.ts';
import { growthRateScale } from '../../problem/discretise.ts';
import type { LandscapeProblem, PointPest } from './problem.ts';
import type { LandscapeOptionResult, LandscapeSettings } from './result.ts';

type Band = RasterLandscape['bands'][number];

/** Mean host cover of host cells within two cells of the band (the stocking the cross-section uses). */
export function stockingAroundBand(p: LandscapeProblem): number {
  const { nx, ny } = p.landscape;
  const band = p.bandAtCells!;
  let sum = 0;
  let count = 0;
  for (let r = 0; r < ny; r++) {
    for (let q = 0; q < nx; q++) {
      const k = r * nx + q;
      if (!p.hostAtCells[k]) continue;
      let near = false;
      for (let dr = -2; dr <= 2 && !near; dr++) {
        for (let dq = -2; dq <= 2 && !near; dq++) {
          const rr = r + dr;
          const qq = q + dq;
          if (rr >= 0 && rr < ny && qq >= 0 && qq < nx && band[rr * nx + qq]) near = true;
        }
      }
      if (near) {
        sum += p.stockingAtCells[k];
        count++;
      }
    }
  }
  return count > 0 ? sum / count : 1;
}

export function crossSection(
  l: RasterLandscape,
  p: LandscapeProblem,
  pest: PointPest,
  band: Band,
  settings: LandscapeSettings,
): LandscapeOptionResult['crossSection'] {
  void l;
  if (band.widthM === undefined) return null;
  const stocking = Math.min(1, Math.max(0.01, stockingAroundBand(p)));
  const ell = Math.sqrt(pest.diffusionHost / growthRateScale(pest.growth));
  const lh = 1 + Math.max(3, 10 * ell);
  const wKm = band.widthM / 1000;
  const cover = band.treatment === 'clearing' ? ('clearing' as const) : ('non-host-forest' as const);
  try {
    const s = pointScenario(
      parseScenario({
        title: `cross-section of ${band.label}`,
        pest,
        transect: { segments: [{ habitat: 'host-forest', lengthKm: 2 * lh + wKm, stocking, stemsPerHa: 100 }] },
        infestation: { fromKm: 0, toKm: 1 },
        barrier: { lengthKm: 1, options: [{ name: band.label.slice(0, 80) || 'band', fromKm: lh, widthM: band.widthM, cover }] },
        horizonYears: Math.max(settings.horizonYears, 50),
        detectionLevel: settings.detectionLevel ?? 0.01,
      }),
    );
    const cw = criticalWidth(s, { fromKm: lh, widthM: band.widthM, cover }, { shouldCancel: settings.shouldCancel });
    return {
      widthM: band.widthM,
      stocking,
      applicable: cw.applicable,
      bracketM: cw.bracketM,
      phasePlaneM: cw.phasePlaneM,
      note: `1-D cross-section along the band's normal (host forest at stocking ${stocking.toFixed(2)} on both sides): ${cw.note}`,
    };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    return {
      widthM: band.widthM,
      stocking,
      applicable: false,
      bracketM: null,
      phasePlaneM: null,
      note: `1-D cross-section not computed: ${e.problems.map((q) => `${q.path} ${q.message}`).join('; ')}`,
    };
  }
}
