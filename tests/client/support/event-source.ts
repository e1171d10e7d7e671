/** Stands in for the browser's EventSource; the test plays the server's part. */
export class FakeEventSource {
  static readonly CONNECTING = 0
  static readonly OPEN = 1
  static readonly CLOSED = 2
  static made: FakeEventSource[] = []

  readyState = FakeEventSource.CONNECTING
  onopen: ((e: Event) => void) | null = null
  onerror: ((e: Event) => void) | null = null
  closed = false
  private readonly listeners = new Map<string, ((e: { data: string }) => void)[]>()

  constructor(
    readonly url: string,
    readonly init?: { withCredentials?: boolean },
  ) {
    FakeEventSource.made.push(this)
  }

  addEventListener(type: string, fn: (e: { data: string }) => void) {
    this.listeners.set(type, [...(this.listeners.get(type) ?? []), fn])
  }

  close() {
    this.readyState = FakeEventSource.CLOSED
    this.closed = true
  }

  serverOpens() {
    this.readyState = FakeEventSource.OPEN
    this.onopen?.(new Event('open'))
  }

  serverSends(type: string, data: unknown) {
    for (const fn of this.listeners.get(type) ?? []) fn({ data: typeof data === 'string' ? data : JSON.stringify(data) })
  }

  /** A dropped stream the browser retries by itself (CONNECTING), or one it gave up on (CLOSED). */
  fails(gaveUp: boolean) {
    this.readyState = gaveUp ? FakeEventSource.CLOSED : FakeEventSource.CONNECTING
    this.onerror?.(new Event('error'))
  }
}
