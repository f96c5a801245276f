// The files the main process itself approved for writing without a dialog. The renderer may name a file
// (the document's path, a recovery copy's original), but only a path main handed out may be written to
// without asking: one the person chose in a dialog, named on the command line, or that main's own
// recent-files list holds. Anything else makes Save ask where.

import path from 'node:path';

export interface RecentLookup {
  has(filePath: string): Promise<boolean>;
}

export class ApprovedFiles {
  private readonly session = new Set<string>();

  constructor(private readonly recent: RecentLookup) {}

  /** A path main obtained itself: a dialog's answer, the command line, a file it opened or saved. */
  add(filePath: string): void {
    this.session.add(filePath);
  }

  /** Whether main approved exactly this path (no normalising: the page must hand back what main gave it). */
  async has(filePath: string | null | undefined): Promise<boolean> {
    if (!filePath || !path.isAbsolute(filePath)) return false;
    return this.session.has(filePath) || (await this.recent.has(filePath).catch(() => false));
  }
}
