import { z } from 'zod'
import { severityCodes } from '../severity-table'

export { severities, severityCodes, type Severity, type SeverityDefinition, type SeverityIconName } from '../severity-table'

/** Most serious first: lists of findings sort in this order. */
export const SeveritySchema = z.enum(severityCodes)
