// What the path checks besides the closure: panel contact (on by default) and the clearance panels must keep
// (the sheet's units; 0: only panels passing through each other), and the first contact found.
import type { PathResultDto } from '../../electron/contract';

export interface ContactControlsProps {
  checked: boolean;
  clearance: string;
  units?: string;
  onChecked(v: boolean): void;
  onClearance(v: string): void;
}

export function ContactControls(p: ContactControlsProps) {
  return (
    <>
      <label title="Check every pair of panels at every sample; the first contact is found to 0.01°">
        <input type="checkbox" checked={p.checked} onChange={(e) => p.onChecked(e.target.checked)} aria-label="check panel contact" /> contact
      </label>
      <label title="Panels closer than this count as in contact (give the panel thickness); 0: only panels passing through each other">
        clearance <input className="small-number" value={p.clearance} disabled={!p.checked} onChange={(e) => p.onClearance(e.target.value)} aria-label="contact clearance" />
        {p.units ? ` ${p.units}` : ''}
      </label>
    </>
  );
}

/** The first contact of a computed path in words, or that none was found. */
export function ContactNote({ result }: { result: PathResultDto }) {
  if (!result.contact) return null;
  const e = result.events.find((x) => x.type === 'contact');
  if (!result.contact.checked) return <span className="contact-note" data-testid="contact-note">contact not checked</span>;
  return (
    <span className={e ? 'contact-note has-contact' : 'contact-note'} data-testid="contact-note" title={e?.text}>
      {e ? `✱ ${e.text}` : `no panels meet${result.contact.clearance > 0 ? ` or come within ${result.contact.clearance}` : ''}`}
    </span>
  );
}
