// The hinge table: label, assignment, limits, current angle, rate and status of every crease; sortable,
// labels and limits editable in place, copied as CSV. Only the rows in view are drawn, so a sheet of
// thousands of creases scrolls and scrubs smoothly.

import { useMemo, useRef, useState, type KeyboardEvent } from 'react';
import { ASSIGNMENT_WORDS, formatAngle, sortRows, type HingeRow, type SortKey } from '../state/display';

export const ROW_HEIGHT = 26;
const OVERSCAN = 8;

export interface HingeTableProps {
  rows: HingeRow[];
  selectedCrease: number | null;
  caption: string;
  onSelect(index: number): void;
  onRename(index: number, label: string): void;
  onLimit(index: number, limit: { minDeg?: number; maxDeg?: number }): void;
  onCopy(rows: HingeRow[]): void;
  /** height of the scrolling body in pixels */
  height: number;
  /** the drive the rate column is against, the drives to choose from, and whether the choice is open (path samples fix it) */
  rateDrive?: string;
  drives?: string[];
  rateDriveFixed?: boolean;
  onRateDrive?(label: string): void;
}

function parseLimit(text: string): number | undefined | null {
  const t = text.trim().replace('°', '').replace(',', '.');
  if (!t) return undefined;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

function EditCell({ value, onCommit, ariaLabel, className }: { value: string; onCommit(text: string): void; ariaLabel: string; className?: string }) {
  const [text, setText] = useState<string | null>(null);
  const commit = () => {
    if (text !== null && text !== value) onCommit(text);
    setText(null);
  };
  return (
    <input
      className={`cell-input ${className ?? ''}`}
      aria-label={ariaLabel}
      value={text ?? value}
      onFocus={() => setText(value)}
      onChange={(e) => setText(e.target.value)}
      onBlur={commit}
      onKeyDown={(e: KeyboardEvent<HTMLInputElement>) => {
        if (e.key === 'Enter') (e.target as HTMLInputElement).blur();
        if (e.key === 'Escape') {
          setText(null);
          (e.target as HTMLInputElement).blur();
        }
      }}
    />
  );
}

const COLUMNS: { key: SortKey | null; title: string; className: string; tip?: string }[] = [
  { key: 'label', title: 'crease', className: 'c-label', tip: 'crease label (click to rename); the file order is the default order' },
  { key: 'assignment', title: 'M/V', className: 'c-assign', tip: 'mountain/valley assignment' },
  { key: null, title: 'stops °', className: 'c-limit', tip: 'hinge stops: lower and upper limit in degrees (empty: none)' },
  { key: 'angle', title: 'angle °', className: 'c-angle', tip: 'fold angle on screen, degrees, valley positive' },
  { key: 'rate', title: 'rate', className: 'c-rate', tip: 'degrees of hinge per degree of the drive named above the table' },
  { key: 'status', title: 'status', className: 'c-status' },
];

export function HingeTable(props: HingeTableProps) {
  const { rows, selectedCrease, height } = props;
  const [sort, setSort] = useState<{ key: SortKey; desc: boolean }>({ key: 'index', desc: false });
  const [filter, setFilter] = useState('');
  const [scrollTop, setScrollTop] = useState(0);
  const bodyRef = useRef<HTMLDivElement>(null);
  const filtered = useMemo(() => {
    const f = filter.trim().toLowerCase();
    const list = f ? rows.filter((r) => r.label.toLowerCase().includes(f) || r.status.includes(f)) : rows;
    return sortRows(list, sort.key, sort.desc);
  }, [rows, filter, sort]);
  const first = Math.max(0, Math.floor(scrollTop / ROW_HEIGHT) - OVERSCAN);
  const last = Math.min(filtered.length, Math.ceil((scrollTop + height) / ROW_HEIGHT) + OVERSCAN);
  const visible = filtered.slice(first, last);
  const onHeader = (key: SortKey | null) => {
    if (!key) return;
    setSort((s) => (s.key === key ? { key, desc: !s.desc } : { key, desc: false }));
  };
  return (
    <section className="panel table-panel" aria-label="Hinge table">
      <div className="table-tools">
        <h2>
          Hinges <span className="count">{rows.length}</span>
        </h2>
        <input className="table-filter" placeholder="crease or status" aria-label="filter hinges" value={filter} onChange={(e) => setFilter(e.target.value)} />
        <button onClick={() => props.onCopy(filtered)} title="Copy the rows shown as CSV, with the cautions line">
          Copy as CSV
        </button>
      </div>
      {props.rateDrive && (
        <div className="rate-against" data-testid="rate-against">
          rates in ° per ° of{' '}
          {props.drives && props.drives.length > 1 && !props.rateDriveFixed ? (
            <select value={props.rateDrive} onChange={(e) => props.onRateDrive?.(e.target.value)} aria-label="rates against drive">
              {props.drives.map((d) => (
                <option key={d} value={d}>
                  {d}
                </option>
              ))}
            </select>
          ) : (
            <strong>{props.rateDrive}</strong>
          )}
          {props.drives && props.drives.length > 1 ? ', the other drives held' : ''}
          {props.rateDriveFixed ? ' (the path’s drive)' : ''}
        </div>
      )}
      <div className="table" role="table" aria-rowcount={filtered.length + 1}>
        <div className="row head" role="row">
          {COLUMNS.map((c) => (
            <div
              key={c.title}
              role="columnheader"
              className={`cell ${c.className}${c.key ? ' sortable' : ''}`}
              title={c.tip}
              aria-sort={c.key && sort.key === c.key ? (sort.desc ? 'descending' : 'ascending') : undefined}
              onClick={() => onHeader(c.key)}
            >
              {c.title}
              {c.key && sort.key === c.key ? (sort.desc ? ' ▾' : ' ▴') : ''}
            </div>
          ))}
        </div>
        <div className="table-body" ref={bodyRef} style={{ height }} onScroll={(e) => setScrollTop((e.target as HTMLDivElement).scrollTop)} data-testid="hinge-table">
          <div style={{ height: filtered.length * ROW_HEIGHT, position: 'relative' }}>
            {visible.map((r, k) => (
              <div
                key={r.index}
                role="row"
                data-crease={r.index}
                data-label={r.label}
                className={`row${r.index === selectedCrease ? ' is-selected' : ''}${r.isDrive ? ' is-drive' : ''}${r.violates ? ' is-violating' : ''}`}
                style={{ top: (first + k) * ROW_HEIGHT, height: ROW_HEIGHT }}
                onClick={() => props.onSelect(r.index)}
              >
                <div className="cell c-label" role="cell" title={`crease ${r.index}`}>
                  <EditCell value={r.label} ariaLabel={`label of crease ${r.index}`} onCommit={(t) => props.onRename(r.index, t)} />
                </div>
                <div className={`cell c-assign assign-${r.assignment}`} role="cell" title={ASSIGNMENT_WORDS[r.assignment]}>
                  {r.assignment}
                </div>
                <div className="cell c-limit" role="cell">
                  <EditCell
                    className="limit-input"
                    value={r.minDeg !== undefined ? String(+r.minDeg.toFixed(3)) : ''}
                    ariaLabel={`lower limit of crease ${r.label}`}
                    onCommit={(t) => {
                      const v = parseLimit(t);
                      if (v !== null) props.onLimit(r.index, { minDeg: v, maxDeg: r.maxDeg });
                    }}
                  />
                  <span className="limit-sep">…</span>
                  <EditCell
                    className="limit-input"
                    value={r.maxDeg !== undefined ? String(+r.maxDeg.toFixed(3)) : ''}
                    ariaLabel={`upper limit of crease ${r.label}`}
                    onCommit={(t) => {
                      const v = parseLimit(t);
                      if (v !== null) props.onLimit(r.index, { minDeg: r.minDeg, maxDeg: v });
                    }}
                  />
                </div>
                <div className="cell c-angle num" role="cell" data-testid="angle-cell">
                  {formatAngle(r.angleDeg)}
                </div>
                <div className="cell c-rate num" role="cell">
                  {r.rate === null ? '–' : r.rate.toFixed(3)}
                </div>
                <div className={`cell c-status${r.status === 'ok' ? ' quiet' : ''}`} role="cell">
                  {r.status}
                </div>
              </div>
            ))}
          </div>
        </div>
      </div>
      <div className="table-foot">{props.caption}</div>
    </section>
  );
}
