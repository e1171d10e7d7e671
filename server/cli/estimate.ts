/**
 * Prices an estimate from a JSON file: `npm run -s estimate -- FILE.json`.
 * Prints the result, or `{ "error": { code, message, issues } }` and exits 1, on stdout either
 * way so the output can be piped straight into another tool.
 */
import { readFile } from 'node:fs/promises'
import { safeCalculateEstimate, summarise } from '../../shared/estimate'

interface CliError {
  code: string
  message: string
  issues: unknown[]
}

async function run(file: string | undefined): Promise<{ ok: true; output: unknown } | { ok: false; error: CliError }> {
  if (!file) return { ok: false, error: { code: 'missing_file', message: 'Usage: npm run -s estimate -- FILE.json', issues: [] } }

  let text: string
  try {
    text = await readFile(file, 'utf8')
  } catch (error) {
    const reason = error instanceof Error && 'code' in error ? String(error.code) : 'unknown error'
    return { ok: false, error: { code: 'unreadable_file', message: `Cannot read ${file} (${reason}).`, issues: [] } }
  }

  let input: unknown
  try {
    input = JSON.parse(text)
  } catch (error) {
    const reason = error instanceof Error ? error.message : String(error)
    return { ok: false, error: { code: 'invalid_json', message: `${file} is not valid JSON: ${reason}`, issues: [] } }
  }

  const result = safeCalculateEstimate(input)
  if (!result.success) return { ok: false, error: { code: 'invalid_estimate', message: summarise(result.issues), issues: result.issues } }
  return { ok: true, output: result.data }
}

const outcome = await run(process.argv[2])
console.log(JSON.stringify(outcome.ok ? outcome.output : { error: outcome.error }, null, 2))
// Setting the code rather than calling exit() lets stdout drain when it is a pipe.
process.exitCode = outcome.ok ? 0 : 1
