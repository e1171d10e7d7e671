import { DEFAULT_TIME_ZONE, dateTimeFormat } from '../../shared/dates'
import { smsSegments } from '../../shared/sms'
import { escapeHtml } from '../../server/lib/email-layout'
import type { MessageRecord } from './state'

/**
 * The page at `/`: every text received, newest first, like the mail catcher's inbox. Plain HTML with
 * inline CSS (no scripts, fonts or other assets), one column that reads at phone width, every piece
 * of received text escaped.
 */

const STYLE = `
*{box-sizing:border-box}
body{margin:0;font-family:system-ui,-apple-system,"Segoe UI",Roboto,Arial,sans-serif;font-size:1rem;line-height:1.5;color:#1a1a1a;background:#f4f5f6}
.test-banner{background:#fff1c2;color:#3d2f00;border-bottom:3px solid #c8642b;padding:.75rem 1rem;text-align:center}
main{max-width:40rem;margin:0 auto;padding:1rem 1rem 2.5rem}
h1{font-size:1.35rem;margin:.5rem 0}
.lead{margin:0 0 1rem;color:#3b4046}
a{color:#1f3a4d}a:focus{outline:3px solid #c8642b;outline-offset:2px}
.refresh{display:inline-flex;align-items:center;min-height:44px}
ol{list-style:none;margin:0;padding:0}
article{background:#fff;border:1px solid #d5d9de;border-radius:8px;padding:1rem;margin:0 0 1rem}
.top{display:flex;flex-wrap:wrap;justify-content:space-between;gap:.25rem .75rem;margin:0 0 .5rem}
.status{font-weight:700;border-radius:4px;padding:0 .5rem;border:2px solid currentColor}
.status-delivered{color:#1e5b2a}.status-undelivered{color:#8f1d16}.status-other{color:#1f3a4d}
.body{white-space:pre-wrap;overflow-wrap:anywhere;background:#eef3f6;border-radius:6px;padding:.75rem;margin:.5rem 0}
dl{display:grid;grid-template-columns:max-content 1fr;gap:.15rem .75rem;margin:0}
dt{font-weight:600}dd{margin:0;overflow-wrap:anywhere}
.error{color:#8f1d16}
`

const timeFormat = dateTimeFormat({ dateStyle: 'medium', timeStyle: 'medium', timeZone: DEFAULT_TIME_ZONE })

function statusClass(status: string | null): string {
  if (status === 'delivered') return 'status-delivered'
  if (status === 'undelivered' || status === 'failed') return 'status-undelivered'
  return 'status-other'
}

function callbackSummary(record: MessageRecord): string {
  if (record.statusCallback === null) return 'none asked for'
  const received = record.callbacks.filter((c) => c.succeeded).length
  const failed = record.callbacks.filter((c) => !c.succeeded).length
  return `${received} received${failed ? `, ${failed} failed attempts` : ''}`
}

function messageItem(record: MessageRecord): string {
  const m = record.message
  const body = m.body ?? ''
  const { encoding } = smsSegments(body)
  const received = new Date(record.receivedAt)
  const error = m.error_code !== null ? `<dt>Error</dt><dd class="error">${m.error_code} ${escapeHtml(m.error_message ?? '')}</dd>` : ''
  return `<li><article aria-label="Text to ${escapeHtml(m.to ?? '')}">
<div class="top"><time datetime="${received.toISOString()}">${escapeHtml(timeFormat.format(received))}</time>
<span class="status ${statusClass(m.status)}">${escapeHtml(m.status ?? '')}</span></div>
<dl>
<dt>To</dt><dd>${escapeHtml(m.to ?? '')}</dd>
<dt>From</dt><dd>${escapeHtml(m.from ?? `(Messaging Service ${m.messaging_service_sid ?? ''})`)}</dd>
<dt>Segments</dt><dd>${escapeHtml(m.num_segments ?? '')} (${encoding})</dd>
${error}<dt>Callbacks</dt><dd>${escapeHtml(callbackSummary(record))}</dd>
</dl>
<p class="body">${escapeHtml(body)}</p>
<dl><dt>SID</dt><dd><a href="/api/messages/${encodeURIComponent(record.sid)}">${escapeHtml(record.sid)}</a></dd></dl>
</article></li>`
}

export function renderMessagesPage(records: MessageRecord[]): string {
  const list = records.length
    ? `<ol>${records.map(messageItem).join('\n')}</ol>`
    : '<p>No text messages yet. Texts the app sends appear here.</p>'
  return `<!doctype html>
<html lang="en-GB">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex">
<title>Text messages — SMS fake</title>
<style>${STYLE}</style>
</head>
<body>
<div class="test-banner" role="note"><strong>TEST</strong> — a local stand-in for Twilio. No text reaches a phone.</div>
<main>
<h1>Text messages</h1>
<p class="lead">${records.length === 1 ? '1 message' : `${records.length} messages`}, newest first. <a class="refresh" href="">Refresh</a> · <a class="refresh" href="/api/messages">JSON</a></p>
${list}
</main>
</body>
</html>`
}
