// The dialogs: a new pattern from a generator, the export of tables and shapes with their options, and the layers of an imported drawing.

import { useState, type ReactNode } from 'react';
import type { DrawingColourDto, DrawingLayerDto, DrawingOptionsDto, ExportKind, ExportOptionsDto, GeneratorSpec, MessageDto, ScheduleProfile } from '../../electron/contract';
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
  const units = f.units?.trim() || undefined;
  if (units && units.length > 50) return 'The unit of length is at most 50 characters (e.g. mm).';
  switch (kind) {
    case 'miura':
      if (![num('rows'), num('cols')].every((n) => Number.isInteger(n) && n > 0)) return 'Rows and columns must be whole numbers above 0.';
      return { kind, rows: num('rows'), cols: num('cols'), a: num('a'), b: num('b'), alphaDeg: num('alphaDeg'), driveDeg: num('driveDeg'), name, units };
    case 'single-vertex': {
      const s = list('sectorsDeg');
      if (s.length < 3 || s.some((x) => !Number.isFinite(x) || x <= 0)) return 'Give at least three positive sector angles, separated by commas.';
      return { kind, sectorsDeg: s, radius: num('radius'), name, units };
    }
    case 'waterbomb':
      return { kind, size: num('size'), name, units };
    case 'degree5': {
      const s = list('sectorsDeg5');
      if (s.length !== 5 || s.some((x) => !Number.isFinite(x) || x <= 0)) return 'A degree-5 vertex needs five positive sector angles.';
      return { kind, sectorsDeg: s, radius: num('radius'), name, units };
    }
  }
}

export function NewDialog({ onCreate, onClose }: { onCreate(spec: GeneratorSpec): Promise<MessageDto[] | null>; onClose(): void }) {
  const [kind, setKind] = useState<Kind>('miura');
  const [f, setF] = useState<Record<string, string>>({
    rows: '4', cols: '6', a: '40', b: '30', alphaDeg: '70', driveDeg: '60',
    sectorsDeg: '70, 110, 110, 70', radius: '50', size: '100', sectorsDeg5: '70, 80, 65, 75, 70', name: '', units: 'mm',
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
            <NumberField label="suggested drive (°)" value={f.driveDeg} onChange={set('driveDeg')} hint="folded the way its zigzag crease is assigned (a mountain gets −)" />
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
        <label className="field">
          <span>name (optional)</span>
          <input value={f.name} onChange={(e) => set('name')(e.target.value)} />
        </label>
        <label className="field">
          <span>unit of length</span>
          <input value={f.units} onChange={(e) => set('units')(e.target.value)} aria-label="unit of length" />
          <small>the lengths above are in it, e.g. mm</small>
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
  dxf: 'Flat pattern as DXF (a layer per assignment, for CAD and laser cutters)',
  svg: 'Flat pattern as SVG (a group per assignment)',
  obj: 'Folded shape as OBJ',
  stl: 'Folded shape as STL',
  'shape-json': 'Folded shape as JSON',
};

const PROFILE_WORDS: Record<ScheduleProfile, string> = {
  constant: 'constant velocity',
  trapezoid: 'trapezoid (accelerate, cruise, stop)',
  's-curve': 'S-curve (jerk-limited)',
};

/** An optional number field as typed: undefined when empty, NaN when it is not a number. */
function optionalNumber(text: string): number | undefined {
  return text.trim() === '' ? undefined : Number(text);
}

/** The schedule fields as typed, turned into export options, or the first problem in words. */
export function scheduleOptions(f: Record<string, string>, profile: ScheduleProfile, rowsBy: 'rows' | 'dt'): ExportOptionsDto | string {
  const timeS = Number(f.timeS);
  if (!(timeS > 0)) return 'The total time must be a number of seconds above 0.';
  const out: ExportOptionsDto = { timeS, profile };
  if (profile !== 'constant') {
    const ta = optionalNumber(f.accelTimeS);
    if (ta !== undefined && !(ta >= 0 && ta <= timeS / 2)) return `The acceleration time must be between 0 and half the total time (${timeS / 2} s).`;
    if (ta !== undefined) out.accelTimeS = ta;
  }
  if (profile === 's-curve') {
    const tj = optionalNumber(f.jerkTimeS);
    if (tj !== undefined && !(tj >= 0)) return 'The jerk time must be a number of seconds, 0 or more.';
    if (tj !== undefined) out.jerkTimeS = tj;
  }
  if (rowsBy === 'rows') {
    const n = Number(f.rows);
    if (!Number.isInteger(n) || n < 2 || n > 100_000) return 'The number of rows must be a whole number from 2 to 100000.';
    out.rows = n;
  } else {
    const dt = Number(f.dtS);
    if (!(dt > 0)) return 'The time step must be a number of seconds above 0.';
    out.dtS = dt;
  }
  const rate = optionalNumber(f.maxRate), accel = optionalNumber(f.maxAccel);
  if (rate !== undefined && !(rate > 0)) return 'The hinge rate limit must be above 0 (or empty for none).';
  if (accel !== undefined && !(accel > 0)) return 'The hinge acceleration limit must be above 0 (or empty for none).';
  if (rate !== undefined) out.maxRateDegPerS = rate;
  if (accel !== undefined) out.maxAccelDegPerS2 = accel;
  return out;
}

/** One hinge's own limits as typed in the schedule dialog. */
export interface HingeLimitText {
  crease: string;
  rate: string;
  accel: string;
}

/** The per-hinge rows as export options (empty rows skipped), or the first problem in words. */
export function hingeLimitOptions(rows: HingeLimitText[]): NonNullable<ExportOptionsDto['hingeLimits']> | string {
  const out: NonNullable<ExportOptionsDto['hingeLimits']> = [];
  const seen = new Set<string>();
  for (const [k, r] of rows.entries()) {
    const crease = r.crease.trim();
    const rate = optionalNumber(r.rate), accel = optionalNumber(r.accel);
    if (!crease && rate === undefined && accel === undefined) continue;
    if (!crease) return `Hinge limit ${k + 1}: name the crease (its label).`;
    if (seen.has(crease)) return `Crease ${crease} has two rows of limits; keep one.`;
    seen.add(crease);
    if (rate === undefined && accel === undefined) return `Hinge limit for ${crease}: give a rate limit, an acceleration limit, or both.`;
    if (rate !== undefined && !(rate > 0)) return `The rate limit of ${crease} must be above 0 °/s.`;
    if (accel !== undefined && !(accel > 0)) return `The acceleration limit of ${crease} must be above 0 °/s².`;
    out.push({ crease, ...(rate !== undefined ? { maxRateDegPerS: rate } : {}), ...(accel !== undefined ? { maxAccelDegPerS2: accel } : {}) });
  }
  return out;
}

export function ExportDialog({ hasPath, onExport, onClose }: { hasPath: boolean; onExport(kind: ExportKind, options: ExportOptionsDto): Promise<string | null>; onClose(): void }) {
  const [kind, setKind] = useState<ExportKind>(hasPath ? 'angle-table' : 'obj');
  const [format, setFormat] = useState<'csv' | 'json'>('csv');
  const [rates, setRates] = useState(false);
  const [creases, setCreases] = useState('');
  const [profile, setProfile] = useState<ScheduleProfile>('trapezoid');
  const [rowsBy, setRowsBy] = useState<'rows' | 'dt'>('rows');
  const [f, setF] = useState<Record<string, string>>({ timeS: '10', accelTimeS: '', jerkTimeS: '', rows: '101', dtS: '0.1', maxRate: '', maxAccel: '' });
  const set = (k: string) => (v: string) => setF({ ...f, [k]: v });
  const [busy, setBusy] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const [hingeRows, setHingeRows] = useState<HingeLimitText[]>([{ crease: '', rate: '', accel: '' }]);
  const setHingeRow = (k: number, patch: Partial<HingeLimitText>) => setHingeRows(hingeRows.map((r, i) => (i === k ? { ...r, ...patch } : r)));
  const needsPath = kind === 'angle-table' || kind === 'schedule';
  const go = async () => {
    let options: ExportOptionsDto = {};
    if (kind === 'angle-table') options = { format, rates, creases: creases.split(/[,\s]+/).filter(Boolean) };
    if (kind === 'schedule') {
      const o = scheduleOptions(f, profile, rowsBy);
      if (typeof o === 'string') return setProblem(o);
      const own = hingeLimitOptions(hingeRows);
      if (typeof own === 'string') return setProblem(own);
      options = { ...o, format, hingeLimits: own };
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
              <label className="field check">
                <input type="checkbox" checked={rates} onChange={(e) => setRates(e.target.checked)} />
                <span>rate columns (° per ° of drive)</span>
              </label>
              <label className="field wide">
                <span>creases (labels, empty: all)</span>
                <input value={creases} onChange={(e) => setCreases(e.target.value)} placeholder="e.g. z6_4, s3_2" />
              </label>
            </>
          )}
          {kind === 'schedule' && (
            <>
              <NumberField label="total time (s)" value={f.timeS} onChange={set('timeS')} />
              <label className="field wide">
                <span>drive profile</span>
                <select value={profile} onChange={(e) => setProfile(e.target.value as ScheduleProfile)} aria-label="drive profile">
                  {(Object.keys(PROFILE_WORDS) as ScheduleProfile[]).map((p) => (
                    <option key={p} value={p}>{PROFILE_WORDS[p]}</option>
                  ))}
                </select>
              </label>
              {profile !== 'constant' && <NumberField label="acceleration time (s)" value={f.accelTimeS} onChange={set('accelTimeS')} hint="empty: a quarter of the total time" />}
              {profile === 's-curve' && <NumberField label="jerk time (s)" value={f.jerkTimeS} onChange={set('jerkTimeS')} hint="empty: a quarter of the acceleration time" />}
              <label className="field">
                <span>rows by</span>
                <select value={rowsBy} onChange={(e) => setRowsBy(e.target.value as 'rows' | 'dt')} aria-label="rows by">
                  <option value="rows">number of rows</option>
                  <option value="dt">time step</option>
                </select>
              </label>
              {rowsBy === 'rows' ? <NumberField label="rows" value={f.rows} onChange={set('rows')} step="1" hint="the last row is at the total time" /> : <NumberField label="time step (s)" value={f.dtS} onChange={set('dtS')} hint="the last row is at the total time" />}
              <NumberField label="hinge rate limit (°/s)" value={f.maxRate} onChange={set('maxRate')} hint="every hinge; empty: none" />
              <NumberField label="hinge acceleration limit (°/s²)" value={f.maxAccel} onChange={set('maxAccel')} hint="every hinge; empty: none" />
              <div className="hinge-limits" role="group" aria-label="limits of single hinges">
                <span className="field-title">limits of single hinges (over the ones above)</span>
                {hingeRows.map((r, k) => (
                  <div key={k} className="hinge-limit-row">
                    <input placeholder="crease" value={r.crease} onChange={(e) => setHingeRow(k, { crease: e.target.value })} aria-label={`crease of hinge limit ${k + 1}`} />
                    <input placeholder="rate °/s" value={r.rate} onChange={(e) => setHingeRow(k, { rate: e.target.value })} aria-label={`rate limit ${k + 1} (°/s)`} />
                    <input placeholder="accel. °/s²" value={r.accel} onChange={(e) => setHingeRow(k, { accel: e.target.value })} aria-label={`acceleration limit ${k + 1} (°/s²)`} />
                    {k === hingeRows.length - 1 ? (
                      <button className="icon-button" onClick={() => setHingeRows([...hingeRows, { crease: '', rate: '', accel: '' }])} aria-label="another hinge limit" title="another hinge">+</button>
                    ) : (
                      <button className="icon-button" onClick={() => setHingeRows(hingeRows.filter((_, i) => i !== k))} aria-label={`remove hinge limit ${k + 1}`}>×</button>
                    )}
                  </div>
                ))}
              </div>
            </>
          )}
        </div>
      )}
      {needsPath && <p className="hint">Each row is solved exactly; the file’s header records the {kind === 'schedule' ? 'hingeplan schedule' : 'hingeplan table'} command that writes the same numbers.</p>}
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

const HOW_WORDS: Record<DrawingLayerDto['how'], string> = {
  layer: 'as you said',
  name: 'from its name',
  none: 'name says nothing',
};

const ASSIGNMENT_CHOICES: [DrawingLayerDto['assignment'], string][] = [
  ['M', 'M, mountain'],
  ['V', 'V, valley'],
  ['F', 'F, flat (held at 0)'],
  ['B', 'B, boundary'],
  ['U', 'U, unassigned'],
];

/**
 * The layers (DXF) or groups (SVG) of the open drawing, the assignment each gave its lines and how, and the
 * colours the lines are drawn in; the person sets layers, colours and the snap length, and the drawing is
 * read again with them (as `--layer`, `--stroke` and `--snap` on the command line). A layer set here wins
 * over a colour, a colour over the words of a name. Lines on no named layer cannot be mapped by name.
 */
export function LayersDialog({ layers, colours, options, units, onRead, onClose }: {
  layers: DrawingLayerDto[];
  colours: DrawingColourDto[];
  options: DrawingOptionsDto;
  units?: string;
  onRead(options: DrawingOptionsDto): Promise<MessageDto[] | null>;
  onClose(): void;
}) {
  const [chosen, setChosen] = useState<Record<string, DrawingLayerDto['assignment']>>(() => Object.fromEntries(layers.map((l) => [l.name, l.assignment])));
  // a colour's mapping, or '' for none (its lines keep what their layer says)
  const [byColour, setByColour] = useState<Record<string, DrawingLayerDto['assignment'] | ''>>(() => Object.fromEntries(colours.map((c) => [c.colour, c.assignment ?? ''])));
  const [snap, setSnap] = useState(options.snap === undefined ? '' : String(options.snap));
  const [problems, setProblems] = useState<string[]>([]);
  const [busy, setBusy] = useState(false);
  const read = async () => {
    const s = snap.trim() === '' ? undefined : Number(snap.replace(',', '.'));
    if (s !== undefined && !(Number.isFinite(s) && s >= 0)) {
      setProblems([`The snap length "${snap}" is not a length ≥ 0.`]);
      return;
    }
    setBusy(true);
    // a layer is mapped when the person set it (now or before); the others are left to colours and names
    const mapped = layers.filter((l) => l.name !== '' && (l.how === 'layer' || chosen[l.name] !== l.assignment));
    const strokes = colours.flatMap((c) => (byColour[c.colour] ? [{ colour: c.colour, assignment: byColour[c.colour] as DrawingLayerDto['assignment'] }] : []));
    const result = await onRead({ layers: mapped.map((l) => ({ name: l.name, assignment: chosen[l.name] })), strokes, ...(s !== undefined ? { snap: s } : {}) });
    setBusy(false);
    if (result) setProblems(result.map((m) => m.text));
    else onClose();
  };
  return (
    <Modal title="Layers of the drawing" onClose={onClose}>
      <p className="hint">Each layer or group of the drawing gives its lines an assignment; so can the colour they are drawn in. Set the ones the names do not say, then read the drawing again. A layer set here wins over a colour, a colour over the words of a name.</p>
      <table className="layers-table" aria-label="layers of the drawing">
        <thead>
          <tr><th>layer or group</th><th>lines</th><th>read</th><th>assignment</th></tr>
        </thead>
        <tbody>
          {layers.map((l) => (
            <tr key={l.name} className={l.how === 'none' ? 'layer-unsaid' : undefined}>
              <td>{l.name === '' ? <em>no named layer</em> : l.name}</td>
              <td className="num">{l.lines}</td>
              <td>{HOW_WORDS[l.how]}</td>
              <td>
                <select
                  aria-label={`assignment of layer ${l.name || '(none)'}`}
                  value={chosen[l.name]}
                  disabled={l.name === ''}
                  onChange={(e) => setChosen({ ...chosen, [l.name]: e.target.value as DrawingLayerDto['assignment'] })}
                >
                  {ASSIGNMENT_CHOICES.map(([a, words]) => <option key={a} value={a}>{words}</option>)}
                </select>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {colours.length > 0 && (
        <table className="layers-table" aria-label="line colours of the drawing">
          <thead>
            <tr><th>line colour</th><th>lines</th><th>assignment</th></tr>
          </thead>
          <tbody>
            {colours.map((c) => (
              <tr key={c.colour}>
                <td><span className="colour-swatch" style={{ background: c.colour.startsWith('#') ? c.colour : undefined }} />{c.text}</td>
                <td className="num">{c.lines}</td>
                <td>
                  <select aria-label={`assignment of colour ${c.text}`} value={byColour[c.colour]} onChange={(e) => setByColour({ ...byColour, [c.colour]: e.target.value as DrawingLayerDto['assignment'] | '' })}>
                    <option value="">as its layer says</option>
                    {ASSIGNMENT_CHOICES.map(([a, words]) => <option key={a} value={a}>{words}</option>)}
                  </select>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <label className="field">
        <span>snap end points within{units ? ` (${units})` : ''}</span>
        <input value={snap} onChange={(e) => setSnap(e.target.value)} aria-label="snap length" placeholder="default" />
        <small>empty: a small fraction of the sheet size</small>
      </label>
      {problems.length > 0 && (
        <ul className="dialog-problems" role="alert">
          {problems.map((p, i) => <li key={i}>{p}</li>)}
        </ul>
      )}
      <div className="dialog-buttons">
        <button onClick={onClose}>Cancel</button>
        <button className="primary" onClick={() => void read()} disabled={busy}>{busy ? 'Reading…' : 'Read again'}</button>
      </div>
    </Modal>
  );
}
