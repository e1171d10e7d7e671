import { ref, watch } from 'vue'
import { decimalPattern } from '@shared/decimal'

export interface ParsedTextOptions<T> {
  read: () => T
  parse: (text: string) => T | null
  format: (value: T) => string
  /** Called with each new value that parses and differs from the current one. */
  write: (value: T) => void
  /** Called with the message while the text does not parse, and with null once it does again. */
  problem: (message: string | null) => void
  message: () => string
}

/**
 * A field whose text is kept as typed until it means something: "1." or "12.5x" stays on screen
 * with a message instead of being thrown away, and the value changes only once the text parses.
 * When the value changes from outside (another line moved, the server's copy arrived) the text follows it.
 */
export function useParsedText<T>(options: ParsedTextOptions<T>) {
  const text = ref(options.format(options.read()))
  const error = ref<string | null>(null)

  function clear(): void {
    if (!error.value) return
    error.value = null
    options.problem(null)
  }

  watch(options.read, (value) => {
    if (options.parse(text.value.trim()) !== value) {
      text.value = options.format(value)
      clear()
    }
  })

  function input(value: string | null): void {
    text.value = value ?? ''
    const parsed = options.parse(text.value.trim())
    if (parsed === null) {
      error.value = options.message()
      options.problem(error.value)
      return
    }
    clear()
    if (parsed !== options.read()) options.write(parsed)
  }

  return { text, error, input }
}

/** A parser for decimal strings such as hours ("1.5") and rates ("20"): the text itself when it fits. */
export function decimalText(places: number): (text: string) => string | null {
  const pattern = decimalPattern(places)
  return (text) => (pattern.test(text) ? text : null)
}
