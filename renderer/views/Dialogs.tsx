// The two dialogs: a new pattern from a generator, and the export of tables and shapes with their options.

import { useState, type ReactNode } from 'react';
import type { ExportKind, ExportOptionsDto, GeneratorSpec, MessageDto } from '../../electron/contract';
import { CAUTIONS } from '../../solver/formats/cautions';

function Modal({ title, children, onClose }: { title: string; children: ReactNode; onClose(): void }) {
  return (
    <div className="modal-backdrop" onMouseDown={(e) => e.target === e.currentTarget && onClose()}>
      <div className="modal" role="dialog" aria-modal="true" aria-label={title} onKeyDown={(e) => e.key === 'Escape' && onClose()}>
        <h2>{title}</h2>
        {children}
      </div>
    </div>
  );
}

function NumberField({ label, value, onChange, step = 'any', hint }: { label: string; value: string; onChange(v: string): void; step?: string; hint?: string }) {
  return (
    <label className="field">
      <span>{label}</span>
      <input type="number" step={step} value={value} onChange={(e) => onChange(e.target.value)} />
      {hint && <small>{hint}</small>}
    </label>
  );
}

type Kind = GeneratorSpec['kind'];

const KIND_WORDS: Record<Kind, string> = {
  miura: 'Miura-ori sheet',
  'single-vertex': 'single vertex',
  waterbomb: 'waterbomb base',
  degree5: 'degree-5 vertex',
};

/** The parameters as typed, turned into a generator spec; problems are the generator's to report. */
export function generatorSpec(kind: Kind, f: Record<string, string>): GeneratorSpec | string {
  const num = (k: string) => Number(f[k]);
  const list = (k: string) => f[k].split(/[,\s]+/).filter(Boolean).map(Number);
  const name = f.name?.trim() || undefined;
  switch (kind) {
    case 'miura':
      if (![num('rows'), num('cols')].every((n) => Number.isInteger(n) && n > 0)) return 'Rows and columns must be whole numbers above 0.';
      return { kind, rows: num('rows'), cols: num('cols'), a: num('a'), b: num('b'), alphaDeg: num('alphaDeg'), driveDeg: num('driveDeg'), name };
    case 'single-vertex': {
      const s = list('sectorsDeg');
      if (s.length < 3 || s.some((x) => !Number.isFinite(x) || x <= 0)) return 'Give at least three positive sector angles, separated by commas.';
      return { kind, sectorsDeg: s, radius: num('radius'), name };
    }
    case 'waterbomb':
      return { kind, size: num('size'), name };
    case 'degree5': {
      const s = list('sectorsDeg5');
      if (s.length !== 5 || s.some((x) => !Number.isFinite(x) || x <= 0)) return 'A degree-5 vertex needs five positive sector angles.';
      return { kind, sectorsDeg: s, radius: num('radius'), name };
    }
  }
}

export function NewDialog({ onCreate, onClose }: { onCreate(spec: GeneratorSpec): Promise<MessageDto[] | null>; onClose(): void }) {
  const [kind, setKind] = useState<Kind>('miura');
  const [f, setF] = useState<Record<string, string>>({
    rows: '4', cols: '6', a: '40', b: '30', alphaDeg: '70', driveDeg: '60',
    sectorsDeg: '70, 110, 110, 70', radius: '50', size: '100', sectorsDeg5: '70, 80, 65, 75, 70', name: '',
  });
  const [problems, setProblems] = useState<string[]>([]);
  const [busy, setBusy] = useState(false);
  const set = (k: string) => (v: string) => setF({ ...f, [k]: v });
  const create = async () => {
    const spec = generatorSpec(kind, f);
    if (typeof spec === 'string') return setProblems([spec]);
    setBusy(true);
    const msgs = await onCreate(spec);
    setBusy(false);
    if (msgs) setProblems(msgs.map((m) => m.text));
  };
  return (
    <Modal title="New pattern from a generator" onClose={onClose}>
      <div className="kind-choice" role="radiogroup">
        {(Object.keys(KIND_WORDS) as Kind[]).map((k) => (
          <label key={k}>
            <input type="radio" name="kind" checked={kind === k} onChange={() => setKind(k)} /> {KIND_WORDS[k]}
          </label>
        ))}
      </div>
      <div className="fields">
        {kind === 'miura' && (
          <>
            <NumberField label="rows of cells" value={f.rows} onChange={set('rows')} step="1" />
            <NumberField label="columns of cells" value={f.cols} onChange={set('cols')} step="1" />
            <NumberField label="straight segment a" value={f.a} onChange={set('a')} />
            <NumberField label="zigzag segment b" value={f.b} onChange={set('b')} />
            <NumberField label="zigzag angle α (°)" value={f.alphaDeg} onChange={set('alphaDeg')} hint="between 0° and 90°" />
            <NumberField label="suggested drive (°)" value={f.driveDeg} onChange={set('driveDeg')} />
          </>
        )}
        {kind === 'single-vertex' && (
          <>
            <label className="field wide">
              <span>sector angles (°, counter-clockwise)</span>
              <input value={f.sectorsDeg} onChange={(e) => set('sectorsDeg')(e.target.value)} />
              <small>they must add up to 360°</small>
            </label>
            <NumberField label="radius" value={f.radius} onChange={set('radius')} />
          </>
        )}
        {kind === 'waterbomb' && <NumberField label="side of the square" value={f.size} onChange={set('size')} />}
        {kind === 'degree5' && (
          <>
            <label className="field wide">
              <span>five sector angles (°)</span>
              <input value={f.sectorsDeg5} onChange={(e) => set('sectorsDeg5')(e.target.value)} />
            </label>
            <NumberField label="radius" value={f.radius} onChange={set('radius')} />
          </>
        )}
        <label className="field wide">
          <span>name (optional)</span>
          <input value={f.name} onChange={(e) => set('name')(e.target.value)} />
        </label>
      </div>
      {problems.length > 0 && (
        <ul className="dialog-problems" role="alert">
          {problems.map((p, i) => (
            <li key={i}>{p}</li>
          ))}
        </ul>
      )}
      <div className="dialog-buttons">
        <button onClick={onClose}>Cancel</button>
        <button className="primary" onClick={create} disabled={busy}>
          {busy ? 'Making…' : 'Create'}
        </button>
      </div>
    </Modal>
  );
}

const EXPORT_WORDS: Record<ExportKind, string> = {
  'angle-table': 'Angle table of the computed path',
  schedule: 'Deployment schedule of the computed path',
  fold: 'FOLD file (pattern and the fold angles on screen)',
  obj: 'Folded shape as OBJ',
  stl: 'Folded shape as STL',
  'shape-json': 'Folded shape as JSON',
};

export function ExportDialog({ hasPath, onExport, onClose }: { hasPath: boolean; onExport(kind: ExportKind, options: ExportOptionsDto): Promise<string | null>; onClose(): void }) {
  const [kind, setKind] = useState<ExportKind>(hasPath ? 'angle-table' : 'obj');
  const [format, setFormat] = useState<'csv' | 'json'>('csv');
  const [every, setEvery] = useState('1');
  const [creases, setCreases] = useState('');
  const [stepDeg, setStepDeg] = useState('5');
  const [rate, setRate] = useState('10');
  const [busy, setBusy] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const needsPath = kind === 'angle-table' || kind === 'schedule';
  const go = async () => {
    const options: ExportOptionsDto = { format };
    if (kind === 'angle-table') {
      const n = Number(every);
      if (!Number.isInteger(n) || n < 1) return setProblem('“Every n-th sample” must be a whole number of at least 1.');
      options.every = n;
      options.creases = creases.split(/[,\s]+/).filter(Boolean);
    }
    if (kind === 'schedule') {
      const s = Number(stepDeg), r = Number(rate);
      if (!(s > 0) || !(r > 0)) return setProblem('The schedule step and the drive rate must be above 0.');
      options.stepDeg = s;
      options.rateDegPerSec = r;
    }
    setProblem(null);
    setBusy(true);
    const path = await onExport(kind, options);
    setBusy(false);
    if (path) onClose();
  };
  return (
    <Modal title="Export" onClose={onClose}>
      <div className="kind-choice column" role="radiogroup">
        {(Object.keys(EXPORT_WORDS) as ExportKind[]).map((k) => (
          <label key={k} className={(k === 'angle-table' || k === 'schedule') && !hasPath ? 'disabled' : ''}>
            <input type="radio" name="export-kind" checked={kind === k} disabled={(k === 'angle-table' || k === 'schedule') && !hasPath} onChange={() => setKind(k)} /> {EXPORT_WORDS[k]}
          </label>
        ))}
      </div>
      {!hasPath && <p className="hint">Compute a path to export its angle table or schedule.</p>}
      {needsPath && (
        <div className="fields">
          <label className="field">
            <span>format</span>
            <select value={format} onChange={(e) => setFormat(e.target.value as 'csv' | 'json')} aria-label="table format">
              <option value="csv">CSV</option>
              <option value="json">JSON</option>
            </select>
          </label>
          {kind === 'angle-table' && (
            <>
              <NumberField label="every n-th sample" value={every} onChange={setEvery} step="1" />
              <label className="field wide">
                <span>creases (labels, empty: all)</span>
                <input value={creases} onChange={(e) => setCreases(e.target.value)} placeholder="e.g. z6_4, s3_2" />
              </label>
            </>
          )}
          {kind === 'schedule' && (
            <>
              <NumberField label="drive step (°)" value={stepDeg} onChange={setStepDeg} />
              <NumberField label="drive rate (°/s)" value={rate} onChange={setRate} />
            </>
          )}
        </div>
      )}
      <p className="cautions">{CAUTIONS}</p>
      {problem && <p className="dialog-problems" role="alert">{problem}</p>}
      <div className="dialog-buttons">
        <button onClick={onClose}>Cancel</button>
        <button className="primary" onClick={go} disabled={busy || (needsPath && !hasPath)} data-testid="export-go">
          {busy ? 'Exporting…' : 'Export…'}
        </button>
      </div>
    </Modal>
  );
}
