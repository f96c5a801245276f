// Messages for the person: files that could not be opened (with the readers' messages: what and where),
// exports done, recovered edits waiting. They stay until dismissed.

import type { Notice } from '../state/app';
import type { MessageDto } from '../../electron/contract';

function where(m: MessageDto): string {
  const w = m.where;
  if (!w) return '';
  const parts: string[] = [];
  if (w.field) parts.push(w.field);
  if (w.line !== undefined) parts.push(`line ${w.line}`);
  if (w.creaseLabel) parts.push(`crease ${w.creaseLabel}`);
  else if (w.crease !== undefined && !w.field) parts.push(`crease ${w.crease}`);
  if (w.vertex !== undefined && !w.field) parts.push(`vertex ${w.vertex}`);
  if (w.panel !== undefined && !w.field) parts.push(`panel ${w.panel}`);
  return parts.join(', ');
}

export interface NoticesProps {
  notices: Notice[];
  onDismiss(id: number): void;
  onRestore(recoveryId: string): void;
  onDiscardRecovery(recoveryId: string): void;
}

export function Notices({ notices, onDismiss, onRestore, onDiscardRecovery }: NoticesProps) {
  if (!notices.length) return null;
  return (
    <div className="notices" aria-live="polite">
      {notices.map((n) => (
        <div key={n.id} className={`notice notice-${n.kind}`} role={n.kind === 'error' ? 'alert' : 'status'} data-testid={`notice-${n.kind}`}>
          <div className="notice-head">
            <strong>{n.title}</strong>
            <button className="icon-button" aria-label="dismiss" onClick={() => onDismiss(n.id)}>×</button>
          </div>
          <ul>
            {n.messages.slice(0, 12).map((m, i) => {
              const rec = m.code.startsWith('recovery:') ? m.code.slice('recovery:'.length) : null;
              const at = where(m);
              return (
                <li key={i}>
                  {at && <span className="where">{at}: </span>}
                  {m.text}
                  {rec && (
                    <span className="notice-actions">
                      <button onClick={() => { onRestore(rec); onDismiss(n.id); }}>Restore</button>
                      <button onClick={() => { onDiscardRecovery(rec); onDismiss(n.id); }}>Discard</button>
                    </span>
                  )}
                </li>
              );
            })}
            {n.messages.length > 12 && <li>… and {n.messages.length - 12} more.</li>}
          </ul>
        </div>
      ))}
    </div>
  );
}
