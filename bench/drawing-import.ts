// Speed of reading drawings (a benchmark, not a timed test): Miura-ori sheets written as DXF and SVG by our
// writers (a LINE or <line> per crease, the outline as one polyline, a label per crease), and the same
// sheets drafted without labels and with the outline's long sides as single lines that every zigzag line ends
// on, so the reader must split them at every such end (T-junctions). Prints the CPU time (user + system, this process) and wall time to
// read, clean and check each.
//
//   npx tsx bench/drawing-import.ts            20 × 20 and 40 × 40 cells
//   npx tsx bench/drawing-import.ts 60         one size
// CPU time and peak memory: /usr/bin/time -v npx tsx bench/drawing-import.ts 40
import { miura } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { writeDxf } from '../solver/formats/dxf-write';
import { writeSvg } from '../solver/formats/svg-write';
import { loadPatternText } from '../solver/formats/project';

/** The sheet as a drafter might draw it: no labels, the outline's top and bottom as single long lines. */
function longLinesDxf(n: number): string {
  const g = miura({ rows: n, cols: n, a: 40, b: 30, alphaDeg: 70 }).project!;
  const p = buildPattern(g.source).pattern!;
  const out: string[] = ['  0', 'SECTION', '  2', 'ENTITIES'];
  const line = (layer: string, a: [number, number], b: [number, number]) => out.push('  0', 'LINE', '  8', layer, ' 10', String(a[0]), ' 20', String(a[1]), ' 11', String(b[0]), ' 21', String(b[1]));
  const ni = 2 * n;
  const vid = (i: number, j: number) => j * (ni + 1) + i;
  const v = (i: number, j: number) => p.vertices[vid(i, j)];
  // the outline's top and bottom as one long line each; the straight crease lines alternate M and V along
  // their length, so they are drawn piece by piece on their layers
  for (const j of [0, 2 * n]) line('outline', v(0, j), v(ni, j));
  for (let j = 1; j < 2 * n; j++) {
    for (let i = 0; i < ni; i++) {
      const c = p.creases[p.labelIndex.get(`s${i}_${j}`)!];
      line(c.assignment === 'M' ? 'mountain' : 'valley', v(i, j), v(i + 1, j));
    }
  }
  // zigzag lines are not straight: drawn per segment, the outer two on the outline layer
  for (let i = 0; i <= ni; i++) {
    for (let j = 0; j < 2 * n; j++) line(i === 0 || i === ni ? 'outline' : i % 2 === 0 ? 'valley' : 'mountain', v(i, j), v(i, j + 1));
  }
  out.push('  0', 'ENDSEC', '  0', 'EOF');
  return out.join('\n') + '\n';
}

function time(label: string, creases: number, fn: () => { ok: boolean }) {
  fn(); // warm
  const runs = 3;
  let best = Infinity;
  let bestCpu = Infinity;
  let ok = true;
  for (let k = 0; k < runs; k++) {
    const t0 = performance.now();
    const c0 = process.cpuUsage();
    ok = fn().ok && ok;
    const c = process.cpuUsage(c0);
    best = Math.min(best, performance.now() - t0);
    bestCpu = Math.min(bestCpu, (c.user + c.system) / 1000);
  }
  console.log(`${label.padEnd(44)} ${String(creases).padStart(6)} creases  CPU ${bestCpu.toFixed(0).padStart(5)} ms, wall ${best.toFixed(0).padStart(5)} ms (best of ${runs})${ok ? '' : '  NOT READ'}`);
}

const sizes = process.argv.slice(2).map(Number).filter((x) => x > 0);
for (const n of sizes.length ? sizes : [20, 40]) {
  const g = miura({ rows: n, cols: n, a: 40, b: 30, alphaDeg: 70 }).project!;
  const project = { ...g, units: 'mm' };
  const creases = g.source.edges.length;
  const dxf = writeDxf(project);
  const svg = writeSvg(project);
  const drafted = longLinesDxf(n);
  time(`Miura ${n} × ${n}, our DXF`, creases, () => ({ ok: !!loadPatternText(dxf, 'm.dxf').pattern }));
  time(`Miura ${n} × ${n}, our SVG`, creases, () => ({ ok: !!loadPatternText(svg, 'm.svg').pattern }));
  time(`Miura ${n} × ${n}, drafted DXF (long outline)`, creases, () => ({ ok: !!loadPatternText(drafted, 'd.dxf').pattern }));
}
