/** The tree as a one-page vector PDF (the same scene as the SVG). */
import type { LaidOutTree } from '../engine/layout.ts';
import { buildScene } from './tree-scene.ts';
import { drawScene, newDoc } from './pdf-kit.ts';

export async function treeToPdf(tree: LaidOutTree): Promise<Uint8Array> {
  const scene = buildScene(tree);
  const margin = 24;
  const { doc, done } = newDoc({ size: [scene.width + 2 * margin, scene.height + 2 * margin], margin });
  doc.info.Title = `Power tree: ${tree.title}`;
  drawScene(doc, scene, margin, margin, 1);
  doc.end();
  return done;
}
