// Every request that sets the solver working has an id: the page's own (so it can cancel it) or one made
// here. A cancel marks the request, so work it has not handed to a worker yet is never started, and the
// worker lanes stop what it has handed them.

export interface Request {
  readonly id: string;
  cancelled: boolean;
}

export class RequestRegistry {
  private live = new Map<string, Request>();
  private made = 0;

  /** Start a request under the page's id or a new one; an id already in use is refused. */
  begin(id?: string): Request | undefined {
    const key = id ?? `main-${++this.made}`;
    if (this.live.has(key)) return undefined;
    const request: Request = { id: key, cancelled: false };
    this.live.set(key, request);
    return request;
  }

  end(request: Request): void {
    if (this.live.get(request.id) === request) this.live.delete(request.id);
  }

  /** Mark a live request cancelled; whether there was one. */
  cancel(id: string): boolean {
    const request = this.live.get(id);
    if (!request) return false;
    request.cancelled = true;
    return true;
  }
}
