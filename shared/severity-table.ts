/**
 * The severity levels and how each is shown, with no zod: the client's theme needs this table at
 * start-up, and importing it from the zod contract would put zod in the bundle every page loads
 * first. The contract (SeveritySchema) lives in schemas/severity.ts, which re-exports all of this.
 */

/** Most serious first: lists of findings sort in this order. */
export const severityCodes = ['urgent', 'soon', 'watch', 'ok'] as const
export type Severity = (typeof severityCodes)[number]

export interface SeverityDefinition {
  label: string
  meaning: string
  /** sRGB hex; white text on it meets WCAG AA (checked in tests/client/severity-contrast.test.ts). */
  colour: `#${string}`
  /** A Material Design Icons name; each front end maps it to its own icon (shared/ imports no UI code). */
  icon: `mdi-${string}`
}

/**
 * Severity is always shown as word + icon + colour, never colour alone, so each level has a
 * differently shaped icon as well as its own colour.
 */
export const severities = {
  urgent: {
    label: 'Fix now — safety',
    meaning: 'Unsafe to drive, or damage will spread quickly.',
    colour: '#B3261E',
    icon: 'mdi-alert-octagon',
  },
  soon: {
    label: 'Fix soon',
    meaning: 'Worn or leaking; plan the repair within weeks.',
    colour: '#9A5B00',
    icon: 'mdi-alert',
  },
  watch: {
    label: 'Keep an eye on',
    meaning: 'Within limits today; check again at the next service.',
    colour: '#2F5F8A',
    icon: 'mdi-eye',
  },
  ok: {
    label: 'All good',
    meaning: 'Checked and fine.',
    colour: '#3D6B45',
    icon: 'mdi-check-circle',
  },
} as const satisfies Record<Severity, SeverityDefinition>

export type SeverityIconName = (typeof severities)[Severity]['icon']
