import { parameterEmpty, parameterInvalid, parameterMissing, parameterUnknown } from './errors'

/** What qs makes of a form-encoded body: strings, arrays and nested objects. */
export type FormValue = string | FormValue[] | { [key: string]: FormValue }
export type FormObject = { [key: string]: FormValue }

const isObject = (v: unknown): v is FormObject => typeof v === 'object' && v !== null && !Array.isArray(v)

export const isOneOf = <T extends string>(v: string, allowed: readonly T[]): v is T => allowed.some((a) => a === v)

/**
 * Reads a form-encoded parameter tree the way Stripe's API validates it: each read names the
 * parameter in Stripe's bracket form (`line_items[0][price_data][currency]`) so errors carry
 * Stripe's `param`, and `done()` refuses any parameter nobody read, as Stripe refuses unknown
 * parameters. Empty strings mean "unset" for optional parameters, as in Stripe's form API.
 */
export class ParamReader {
  private readonly seen = new Set<string>()

  private constructor(
    private readonly values: FormObject,
    private readonly prefix: string,
  ) {}

  static root(values: unknown): ParamReader {
    return new ParamReader(isObject(values) ? values : {}, '')
  }

  name(key: string): string {
    return this.prefix ? `${this.prefix}[${key}]` : key
  }

  private raw(key: string): FormValue | undefined {
    this.seen.add(key)
    return Object.hasOwn(this.values, key) ? this.values[key] : undefined
  }

  has(key: string): boolean {
    const v = this.values[key]
    return Object.hasOwn(this.values, key) && v !== ''
  }

  optionalString(key: string, opts: { maxLength?: number } = {}): string | undefined {
    const v = this.raw(key)
    if (v === undefined || v === '') return undefined
    if (typeof v !== 'string')
      throw parameterInvalid(this.name(key), `Invalid string: ${this.name(key)} must be a string.`, 'parameter_invalid_string')
    if (opts.maxLength !== undefined && v.length > opts.maxLength) {
      throw parameterInvalid(this.name(key), `Invalid string: ${this.name(key)} must be at most ${opts.maxLength} characters.`)
    }
    return v
  }

  requiredString(key: string, opts: { maxLength?: number } = {}): string {
    if (Object.hasOwn(this.values, key) && this.values[key] === '') {
      this.seen.add(key)
      throw parameterEmpty(this.name(key))
    }
    const v = this.optionalString(key, opts)
    if (v === undefined) throw parameterMissing(this.name(key))
    return v
  }

  optionalInteger(key: string, opts: { min?: number; max?: number } = {}): number | undefined {
    const v = this.raw(key)
    if (v === undefined || v === '') return undefined
    if (typeof v !== 'string' || !/^-?\d+$/.test(v) || !Number.isSafeInteger(Number(v))) {
      throw parameterInvalid(this.name(key), `Invalid integer: ${typeof v === 'string' ? v : this.name(key)}`, 'parameter_invalid_integer')
    }
    const n = Number(v)
    if (opts.min !== undefined && n < opts.min) {
      throw parameterInvalid(this.name(key), `This value must be greater than or equal to ${opts.min}.`, 'parameter_invalid_integer')
    }
    if (opts.max !== undefined && n > opts.max) {
      throw parameterInvalid(this.name(key), `This value must be less than or equal to ${opts.max}.`, 'parameter_invalid_integer')
    }
    return n
  }

  requiredInteger(key: string, opts: { min?: number; max?: number } = {}): number {
    const v = this.optionalInteger(key, opts)
    if (v === undefined) throw parameterMissing(this.name(key))
    return v
  }

  optionalEnum<T extends string>(key: string, allowed: readonly T[]): T | undefined {
    const v = this.optionalString(key)
    if (v === undefined) return undefined
    if (!isOneOf(v, allowed)) throw parameterInvalid(this.name(key), `Invalid ${this.name(key)}: must be one of ${allowed.join(', ')}`)
    return v
  }

  optionalObject(key: string): ParamReader | undefined {
    const v = this.raw(key)
    if (v === undefined || v === '') return undefined
    if (!isObject(v)) throw parameterInvalid(this.name(key), `Invalid object: ${this.name(key)} must be a hash.`)
    return new ParamReader(v, this.name(key))
  }

  /** qs turns `a[0]=…` into arrays but keeps very sparse or large indices as objects; both are accepted. */
  private list(key: string): FormValue[] | undefined {
    const v = this.raw(key)
    if (v === undefined || v === '') return undefined
    if (Array.isArray(v)) return v
    if (isObject(v) && Object.keys(v).every((k) => /^\d+$/.test(k))) {
      return Object.keys(v)
        .sort((a, b) => Number(a) - Number(b))
        .map((k) => v[k] as FormValue)
    }
    throw parameterInvalid(this.name(key), `Invalid array: ${this.name(key)} must be an array.`)
  }

  objectArray(key: string): ParamReader[] | undefined {
    const items = this.list(key)
    return items?.map((item, i) => {
      const name = `${this.name(key)}[${i}]`
      if (!isObject(item)) throw parameterInvalid(name, `Invalid object: ${name} must be a hash.`)
      return new ParamReader(item, name)
    })
  }

  stringArray(key: string): string[] | undefined {
    const items = this.list(key)
    return items?.map((item, i) => {
      if (typeof item !== 'string')
        throw parameterInvalid(`${this.name(key)}[${i}]`, `Invalid string: ${this.name(key)}[${i}] must be a string.`)
      return item
    })
  }

  /**
   * Metadata limits from https://docs.stripe.com/api/metadata: up to 50 keys, keys up to 40
   * characters without square brackets, values up to 500 characters; an empty value unsets a key.
   */
  metadata(key: string): Record<string, string> | undefined {
    const v = this.raw(key)
    if (v === undefined || v === '') return undefined
    const param = this.name(key)
    if (!isObject(v)) throw parameterInvalid(param, `Invalid object: ${param} must be a hash.`)
    const out: Record<string, string> = {}
    for (const [k, value] of Object.entries(v)) {
      if (typeof value !== 'string') throw parameterInvalid(param, `Invalid metadata: the value for '${k}' must be a string.`)
      if (k.length > 40)
        throw parameterInvalid(param, `Invalid metadata: keys can be at most 40 characters long, but '${k}' is ${k.length}.`)
      if (value.length > 500)
        throw parameterInvalid(
          param,
          `Invalid metadata: values can be at most 500 characters long, but the value for '${k}' is ${value.length}.`,
        )
      if (value !== '') out[k] = value
    }
    if (Object.keys(out).length > 50) {
      throw parameterInvalid(param, `Invalid metadata: metadata can have up to 50 keys, but you passed in ${Object.keys(out).length} keys.`)
    }
    return out
  }

  /** Refuses the first parameter that no read asked for. */
  done(): void {
    for (const key of Object.keys(this.values)) {
      if (!this.seen.has(key)) throw parameterUnknown(this.name(key))
    }
  }
}

/** A stable text form of parsed parameters, so reordered keys still count as "the same parameters". */
export function canonicalParams(value: unknown): string {
  const sort = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(sort)
    if (isObject(v)) {
      return Object.fromEntries(
        Object.keys(v)
          .sort()
          .map((k) => [k, sort(v[k])]),
      )
    }
    return v
  }
  return JSON.stringify(sort(value ?? {}))
}
