/** Where the customer's link leads; the portal reads the token from the query string. */
export function estimateLinkUrl(publicBaseUrl: string, token: string): string {
  return `${publicBaseUrl.replace(/\/$/, '')}/portal/open?token=${encodeURIComponent(token)}`
}

// The estimates module imports the link queries from here; they live in estimate-links.repo.ts with the rest of the SQL.
export { issueEstimateLink, linkExpiry, revokeEstimateLinks } from './estimate-links.repo'
