import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit'
import type pg from 'pg'

/**
 * express-rate-limit counters in PostgreSQL, so a limit holds across server processes.
 * (The published PostgreSQL store runs its own schema migrations outside drizzle/ and pins an old pg,
 * so this small store keeps the table in our own migrations instead.)
 */
export class PostgresRateLimitStore implements Store {
  private windowMs = 60_000
  readonly localKeys = false

  constructor(
    private readonly pool: pg.Pool,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const { rows } = await this.pool.query<{ hits: number; resets_at: Date }>(
      `insert into rate_limits (key, hits, resets_at) values ($1, 1, now() + make_interval(secs => $2))
       on conflict (key) do update set
         hits = case when rate_limits.resets_at <= now() then 1 else rate_limits.hits + 1 end,
         resets_at = case when rate_limits.resets_at <= now() then excluded.resets_at else rate_limits.resets_at end
       returning hits, resets_at`,
      [this.prefix + key, this.windowMs / 1000],
    )
    const row = rows[0]
    if (!row) throw new Error('rate limit upsert returned no row')
    return { totalHits: row.hits, resetTime: row.resets_at }
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await this.pool.query<{ hits: number; resets_at: Date }>(
      'select hits, resets_at from rate_limits where key = $1 and resets_at > now()',
      [this.prefix + key],
    )
    const row = rows[0]
    return row ? { totalHits: row.hits, resetTime: row.resets_at } : undefined
  }

  async decrement(key: string): Promise<void> {
    await this.pool.query('update rate_limits set hits = greatest(hits - 1, 0) where key = $1', [this.prefix + key])
  }

  async resetKey(key: string): Promise<void> {
    await this.pool.query('delete from rate_limits where key = $1', [this.prefix + key])
  }
}
