/**
 * The runs of the barrier analysis, in parts: lengths.ts (front and fringe length scales), window-solver.ts
 * (a window of a layout, started from any state), watches.ts (crossing and approach watches), pinning.ts
 * (verifying a pinned front) and window.ts (window runs). This module re-exports them.
 */
export { barrierGeometry, isBeyond, type BarrierGeometry } from '../../problem/geometry.ts';
export * from './lengths.ts';
export * from './window-solver.ts';
export * from './watches.ts';
export * from './pinning.ts';
export * from './window.ts';
