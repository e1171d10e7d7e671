import type { MeResponse, Principal } from '@shared/schemas/auth'
import { request } from './http'

/** Which sign-in page the e-mailed link leads back to: the staff app's or the customer portal's. */
export type Audience = 'staff' | 'customer'

export interface LinkRequested {
  message: string
}

/** The server answers the same way for an address it does not know, so this says nothing about the account. */
export function requestSignInLink(audience: Audience, email: string): Promise<LinkRequested> {
  return request<LinkRequested>('POST', `/auth/${audience}/link`, { body: { email } })
}

/** Rejects with ApiError code `link_invalid` (400) when the link has expired or was used before. */
export async function verifySignInLink(token: string): Promise<Principal> {
  const { user } = await request<{ user: Principal }>('POST', '/auth/verify', { body: { token } })
  return user
}

export async function getMe(): Promise<Principal | null> {
  const { user } = await request<MeResponse>('GET', '/auth/me')
  return user
}

export function signOut(): Promise<void> {
  return request<void>('POST', '/auth/sign-out')
}
