/**
 * The tree as a one-page vector PDF (the same scene as the SVG). Small trees get a page of
 * their own size; larger ones are scaled onto A3 landscape, which prints, and stay vector
 * so a viewer can zoom in.
 */
import type { LaidOutTree } from '../engine/layout.ts';
import { buildScene } from './tree-scene.ts';
import { drawScene, newDoc } from './pdf-kit.ts';

const A3_LANDSCAPE: [number, number] = [1190.55, 841.89];

export async function treeToPdf(tree: LaidOutTree): Promise<Uint8Array> {
  const scene = buildScene(tree);
  const margin = 24;
  const fits = scene.width + 2 * margin <= A3_LANDSCAPE[0] && scene.height + 2 * margin <= A3_LANDSCAPE[1];
  const size: [number, number] = fits ? [scene.width + 2 * margin, scene.height + 2 * margin] : A3_LANDSCAPE;
  const scale = fits ? 1 : Math.min((size[0] - 2 * margin) / scene.width, (size[1] - 2 * margin) / scene.height);
  const { doc, done } = newDoc({ size, margin });
  doc.info.Title = `Power tree: ${tree.title}`;
  drawScene(doc, scene, margin, margin, scale);
  doc.end();
  return done;
}
