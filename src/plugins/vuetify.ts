import '@fontsource/lato/400.css'
import '@fontsource/lato/700.css'
// Vuetify's styles without its colour pack (bg-red-lighten-2 and the like: 4.7 kB gzipped that every
// page downloads first). The app colours only with theme colours (primary, urgent…) and hex values,
// whose classes the theme generates at run time.
import 'vuetify/styles/layers'
import 'vuetify/styles/core'
import 'vuetify/styles/utilities'
import '@/styles/main.css'
import {
  mdiAccountCancel,
  mdiAccountCheck,
  mdiAccountCircle,
  mdiAccountGroupOutline,
  mdiAccountPlus,
  mdiAlert,
  mdiAlertOctagon,
  mdiCar,
  mdiCheckCircle,
  mdiCloseCircle,
  mdiCogOutline,
  mdiDatabase,
  mdiEmailOutline,
  mdiEye,
  mdiHelpCircleOutline,
  mdiHistory,
  mdiHomeOutline,
  mdiLogout,
  mdiRefresh,
  mdiServer,
} from '@mdi/js'
import { createVuetify, type VuetifyOptions } from 'vuetify'
import { aliases, mdi } from 'vuetify/iconsets/mdi-svg'
// The zod-free table: this plugin is in the bundle every page loads first, and zod is not needed there.
import { severities, type SeverityIconName } from '@shared/severity-table'

/** Keyed by the names in shared/severity-table.ts; `satisfies` fails the build if one is missing. */
const severityIcons = {
  'mdi-alert-octagon': mdiAlertOctagon,
  'mdi-alert': mdiAlert,
  'mdi-eye': mdiEye,
  'mdi-check-circle': mdiCheckCircle,
} satisfies Record<SeverityIconName, string>

export const vuetifyOptions = {
  theme: {
    defaultTheme: 'tickover',
    themes: {
      tickover: {
        dark: false,
        colors: {
          background: '#F6F5F2',
          surface: '#FFFFFF',
          primary: '#1F3A4D',
          secondary: '#C8642B',
          // White on copper is only 3.9:1; black is 5.3:1 and passes WCAG AA for body text.
          'on-secondary': '#000000',
          // Vuetify's own status colours would clash with, and read differently from, the severities.
          error: severities.urgent.colour,
          warning: severities.soon.colour,
          info: severities.watch.colour,
          success: severities.ok.colour,
          urgent: severities.urgent.colour,
          soon: severities.soon.colour,
          watch: severities.watch.colour,
          ok: severities.ok.colour,
        },
        variables: {
          // Vuetify's 0.60 makes labels and hints 3.9–4.3:1 on our surfaces; 0.72 lifts them past WCAG AA's 4.5:1.
          'medium-emphasis-opacity': 0.72,
        },
      },
    },
  },
  icons: {
    defaultSet: 'mdi',
    aliases: {
      ...aliases,
      ...severityIcons,
      home: mdiHomeOutline,
      server: mdiServer,
      database: mdiDatabase,
      refresh: mdiRefresh,
      email: mdiEmailOutline,
      statusUp: mdiCheckCircle,
      statusDown: mdiCloseCircle,
      statusUnknown: mdiHelpCircleOutline,
      account: mdiAccountCircle,
      signOut: mdiLogout,
      team: mdiAccountGroupOutline,
      settings: mdiCogOutline,
      activity: mdiHistory,
      addPerson: mdiAccountPlus,
      personActive: mdiAccountCheck,
      personInactive: mdiAccountCancel,
      vehicle: mdiCar,
    },
    sets: { mdi },
  },
  display: {
    // Below 840 px (phones, small tablets upright) the staff app uses bottom navigation.
    mobileBreakpoint: 'md',
  },
  defaults: {
    // 44 px: the smallest target a gloved or greasy thumb hits reliably (WCAG 2.5.5).
    VBtn: { size: 'large' },
  },
} satisfies VuetifyOptions

export default createVuetify(vuetifyOptions)
