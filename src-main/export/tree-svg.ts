/** The tree as a standalone SVG document, rendered from the shared scene. */
import type { LaidOutTree } from '../engine/layout.ts';
import { buildScene, type Prim, type Scene } from './tree-scene.ts';
import { showText } from '../engine/text-rules.ts';

/**
 * Text for XML content or a quoted attribute. Control, line-break and bidi characters,
 * unpaired surrogates and noncharacters (everything XML 1.0 forbids, and what could
 * reorder or hide a label) are first written as `\u{..}` (text-rules.ts); the markup
 * characters become entities.
 */
export function escapeXml(s: string): string {
  return showText(String(s))
    .replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c]!);
}

const n2 = (x: number) => (Math.round(x * 100) / 100).toString();

function prim(p: Prim): string {
  switch (p.t) {
    case 'rect':
      return `<rect x="${n2(p.x)}" y="${n2(p.y)}" width="${n2(p.w)}" height="${n2(p.h)}" rx="${n2(p.r)}" fill="${p.fill ?? 'none'}" stroke="${p.stroke ?? 'none'}" stroke-width="${n2(p.width)}"${p.dash ? ` stroke-dasharray="${p.dash.join(' ')}"` : ''}/>`;
    case 'line':
      return `<polyline points="${p.pts.map((q) => `${n2(q.x)},${n2(q.y)}`).join(' ')}" fill="none" stroke="${p.stroke}" stroke-width="${n2(p.width)}"${p.dash ? ` stroke-dasharray="${p.dash.join(' ')}"` : ''}${p.arrow ? ' marker-end="url(#rw-arrow)"' : ''}/>`;
    case 'text':
      return `<text x="${n2(p.x)}" y="${n2(p.y)}" font-size="${p.size}"${p.bold ? ' font-weight="bold"' : ''}${p.italic ? ' font-style="italic"' : ''} fill="${p.fill}"${p.anchor && p.anchor !== 'start' ? ` text-anchor="${p.anchor}"` : ''}>${escapeXml(p.text)}</text>`;
  }
}

export function sceneToSvg(scene: Scene, title = 'Power tree'): string {
  const ids = scene.items;
  const body: string[] = [];
  for (const p of scene.prims) body.push(prim(p));
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<svg xmlns="http://www.w3.org/2000/svg" width="${n2(scene.width)}" height="${n2(scene.height)}" viewBox="0 0 ${n2(scene.width)} ${n2(scene.height)}" font-family="DejaVu Sans, Liberation Sans, Arial, sans-serif">`,
    `<title>${escapeXml(title)}</title>`,
    '<defs><marker id="rw-arrow" viewBox="0 0 8 8" refX="7.5" refY="4" markerWidth="7" markerHeight="7" orient="auto"><path d="M0,0 L8,4 L0,8 z" fill="#44515f"/></marker></defs>',
    `<metadata>${escapeXml(JSON.stringify({ generator: 'railwright', items: ids.length }))}</metadata>`,
    ...body,
    // Machine-readable list of what is drawn (rails, stages, domains), one element each.
    '<g id="rw-items" display="none">',
    ...ids.map((i) => `<desc data-id="${escapeXml(i.id)}" data-kind="${escapeXml(i.kind)}">${escapeXml(i.title)}</desc>`),
    '</g>',
    '</svg>',
    '',
  ].join('\n');
}

export function treeToSvg(tree: LaidOutTree): string {
  return sceneToSvg(buildScene(tree), `Power tree: ${tree.title}`);
}
