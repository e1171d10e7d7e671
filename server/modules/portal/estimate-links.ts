/** Where the customer's link leads; the portal reads the token from the query string. */
export function estimateLinkUrl(publicBaseUrl: string, token: string): string {
  return `${publicBaseUrl.replace(/\/$/, '')}/portal/open?token=${encodeURIComponent(token)}`
}
