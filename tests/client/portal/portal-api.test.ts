import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import { confirmEstimate, getMyEstimate, openEstimateLink, pdfUrl, photoUrl, putDecision } from '@/api/portal'

function jsonResponse(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } })
}

const id = '83f5d23a-94b6-47e8-b2f3-a4e5f6078199'

afterEach(() => {
  vi.unstubAllGlobals()
})

describe('the portal API client', () => {
  it('keeps the refusal details a page needs to offer the next step', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () =>
        jsonResponse(410, {
          error: { code: 'link_superseded', message: 'Newer version', details: { newerVersion: true, renewable: true } },
        }),
      ),
    )

    const error = await openEstimateLink('x'.repeat(40)).catch((e: unknown) => e)

    expect(error).toBeInstanceOf(ApiError)
    expect(error).toMatchObject({ status: 410, code: 'link_superseded', details: { newerVersion: true, renewable: true } })
  })

  it('sends the token in the body, never in the address', async () => {
    const fetchMock = vi.fn(async () => jsonResponse(200, { estimateId: id, version: 1, user: {} }))
    vi.stubGlobal('fetch', fetchMock)

    await openEstimateLink('secret-token-value-1234567890')

    const [url, init] = fetchMock.mock.calls[0] as unknown as [string, RequestInit]
    expect(url).toBe('/api/portal/open')
    expect(init.body).toBe('{"token":"secret-token-value-1234567890"}')
  })

  it('addresses decisions, confirmations, versions, photos and the PDF under the estimate', async () => {
    const fetchMock = vi.fn(async () => jsonResponse(200, {}))
    vi.stubGlobal('fetch', fetchMock)

    await putDecision(id, 'item-cv', { version: 2, decision: 'approved' })
    await confirmEstimate(id, {
      version: 2,
      hash: 'a'.repeat(64),
      consents: { startWithinCancellationPeriod: false, cancellationInformationShown: true },
    })
    await getMyEstimate(id, 1)

    const calls = fetchMock.mock.calls as unknown as [string, RequestInit][]
    expect(calls.map(([url, init]) => `${init.method} ${url}`)).toEqual([
      `PUT /api/portal/estimates/${id}/decisions/item-cv`,
      `POST /api/portal/estimates/${id}/confirm`,
      `GET /api/portal/estimates/${id}?version=1`,
    ])
    expect(photoUrl(id, 'p1', 'thumb')).toBe(`/api/portal/estimates/${id}/photos/p1/thumb`)
    expect(photoUrl(id, 'p1', 'full')).toBe(`/api/portal/estimates/${id}/photos/p1`)
    expect(pdfUrl(id)).toBe(`/api/portal/estimates/${id}/pdf`)
  })
})
