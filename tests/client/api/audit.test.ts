import { afterEach, describe, expect, it, vi } from 'vitest'
import { listAuditEvents } from '@/api/audit'

afterEach(() => {
  vi.unstubAllGlobals()
})

describe('listAuditEvents', () => {
  it('sends paging, sort and the filters that are set, and nothing for those that are not', async () => {
    const fetchMock = vi.fn(
      async () =>
        new Response(JSON.stringify({ items: [], total: 0, page: 2, pageSize: 10 }), { headers: { 'Content-Type': 'application/json' } }),
    )
    vi.stubGlobal('fetch', fetchMock)

    await listAuditEvents({
      page: 2,
      pageSize: 10,
      sortBy: 'action',
      sortDesc: false,
      action: 'sign_out',
      actorId: undefined,
      from: '2025-06-01',
      to: '',
    })

    const url = new URL(String((fetchMock.mock.calls[0] as unknown[])[0]), 'http://localhost')
    expect(url.pathname).toBe('/api/audit-events')
    expect(Object.fromEntries(url.searchParams)).toEqual({
      page: '2',
      pageSize: '10',
      sortBy: 'action',
      sortDesc: 'false',
      action: 'sign_out',
      from: '2025-06-01',
    })
  })
})
