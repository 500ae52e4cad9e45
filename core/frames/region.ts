/**
 * The region of a prepared frame that the fit analyses.
 *
 * When the frame holds the whole shadow and its edge, the region is a circle around the pattern centre
 * covering the shadow plus the first four bright Fresnel fringes outside its edge (where defocus and
 * coma show best, physics notes section 3). For a straight edge, I ∝ ½[(C(v) + ½)² + (S(v) + ½)²]
 * (Fresnel diffraction at a straight edge, Born & Wolf, Principles of Optics, chapter 8) has its
 * maxima at v ≈ 1.22, 2.34, 3.08 and 3.67 in the Fresnel-integral variable v = x·√(2/(λL')); these
 * values are computed in test/frames/region.test.ts from @stdlib's Fresnel integrals. On the camera v = 1 is M·√(λL'/2) (`edgeFringeScalePx`), so
 * the margin is EDGE_MARGIN_V = 4 of those units. Otherwise the region is the largest circle around the
 * pattern centre that fits in the frame.
 *
 * Pure.
 */
import { V_STEEPEST_EDGE, type LocatedPattern } from './locate.ts';
import type { PreparedFrame } from './prepare.ts';

/** Margin outside the shadow edge, in units of the edge-fringe scale M·√(λL'/2): four bright fringes. */
export const EDGE_MARGIN_V = 4;

export interface AnalysisRegion {
  /** Circle centre [column, row] in the prepared frame (the located pattern centre). */
  centerPx: [number, number];
  radiusPx: number;
  /** True when the circle holds the whole shadow and its first edge fringes. */
  holdsWholeShadow: boolean;
  /** Usable (unmasked) pixels inside the circle. */
  pixelCount: number;
  description: string;
}

/**
 * Choose the circle to analyse. The shadow radius is the fitted one when the shadow was found
 * (corrected from the radius of steepest rise to the geometric edge), else the expected one.
 */
export function chooseRegion(
  prepared: PreparedFrame,
  located: LocatedPattern,
  expected: { shadowRadiusPx: number; spotRadiusPx: number; edgeFringeScalePx: number },
): AnalysisRegion {
  const { widthPx: W, heightPx: H } = prepared;
  const [cx, cy] = located.centerPx;
  // Distance from the centre to the outer edge of the frame (pixel edges lie half a pixel beyond the centres).
  const room = Math.min(cx + 0.5, W - 0.5 - cx, cy + 0.5, H - 0.5 - cy);
  // The geometric edge lies V_STEEPEST_EDGE fringe scales inside the radius of steepest rise.
  const shadowR =
    located.shadowEdgeRisePx !== null
      ? Math.max(0.5 * located.shadowEdgeRisePx, located.shadowEdgeRisePx - V_STEEPEST_EDGE * expected.edgeFringeScalePx)
      : expected.shadowRadiusPx;
  const margin = EDGE_MARGIN_V * expected.edgeFringeScalePx;
  const wanted = shadowR + margin;
  const holdsWholeShadow = wanted <= room;
  const radiusPx = holdsWholeShadow ? wanted : Math.max(0, room);
  let pixelCount = 0;
  const r2 = radiusPx * radiusPx;
  for (let r = Math.max(0, Math.floor(cy - radiusPx)); r <= Math.min(H - 1, Math.ceil(cy + radiusPx)); r++) {
    for (let c = Math.max(0, Math.floor(cx - radiusPx)); c <= Math.min(W - 1, Math.ceil(cx + radiusPx)); c++) {
      if ((c - cx) ** 2 + (r - cy) ** 2 <= r2 && !prepared.mask[r * W + c]) pixelCount++;
    }
  }
  const at = `around column ${cx.toFixed(1)}, row ${cy.toFixed(1)}`;
  let description: string;
  if (holdsWholeShadow) {
    description = `circle of radius ${radiusPx.toFixed(1)} px ${at}: the whole shadow (radius ${shadowR.toFixed(1)} px) and its first four edge fringes (margin ${margin.toFixed(1)} px)`;
  } else if (shadowR < room) {
    description = `circle of radius ${radiusPx.toFixed(1)} px ${at}, the largest that fits in the frame: it holds the shadow edge (radius ${shadowR.toFixed(1)} px) but not all of the ${margin.toFixed(1)} px of edge fringes around it`;
  } else {
    description = `circle of radius ${radiusPx.toFixed(1)} px ${at}, the largest that fits in the frame: the inside of the shadow only (its edge, radius ${shadowR.toFixed(1)} px, is not all in the frame), so defocus and coma are less well determined`;
  }
  if (radiusPx < 2 * expected.spotRadiusPx) {
    description += `; the region is small compared with the Arago spot (first dark ring ${expected.spotRadiusPx.toFixed(1)} px): centre the pattern in the frame`;
  }
  return { centerPx: [cx, cy], radiusPx, holdsWholeShadow, pixelCount, description };
}
