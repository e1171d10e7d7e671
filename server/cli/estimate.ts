/**
 * Prices an estimate from a JSON file: `npm run -s estimate -- FILE.json`.
 * Prints the result, or `{ "error": { code, message, issues } }` and exits 1, on stdout either
 * way so the output can be piped straight into another tool.
 */
import { readFile } from 'node:fs/promises'
import { pathToFileURL } from 'node:url'
import { safeCalculateEstimate, summarise } from '../../shared/estimate'

export interface CliOutcome {
  exitCode: 0 | 1
  /** What the command prints, as JSON. */
  output: unknown
}

function failure(code: string, message: string, issues: unknown[] = []): CliOutcome {
  return { exitCode: 1, output: { error: { code, message, issues } } }
}

export async function runEstimateCli(args: readonly string[]): Promise<CliOutcome> {
  const file = args[0]
  if (!file) return failure('missing_file', 'Usage: npm run -s estimate -- FILE.json')

  let text: string
  try {
    text = await readFile(file, 'utf8')
  } catch (error) {
    const reason = error instanceof Error && 'code' in error ? String(error.code) : 'unknown error'
    return failure('unreadable_file', `Cannot read ${file} (${reason}).`)
  }

  let input: unknown
  try {
    input = JSON.parse(text)
  } catch (error) {
    return failure('invalid_json', `${file} is not valid JSON: ${error instanceof Error ? error.message : String(error)}`)
  }

  const result = safeCalculateEstimate(input)
  if (!result.success) return failure('invalid_estimate', summarise(result.issues), result.issues)
  return { exitCode: 0, output: result.data }
}

// Run only when executed as a command, so tests can import runEstimateCli without side effects.
if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const { exitCode, output } = await runEstimateCli(process.argv.slice(2))
  console.log(JSON.stringify(output, null, 2))
  // Setting the code rather than calling exit() lets stdout drain when it is a pipe.
  process.exitCode = exitCode
}
