/**
 * The layering rules in eslint.config.js bite: each case lints a snippet that breaks (or keeps) a
 * rule with the project's own configuration and expects the rule's error (or none). Cases that
 * need other modules on disk — a cycle can only be seen by following imports from file to file —
 * write them to a temporary folder under shared/ (so the @shared/* path resolves too) and remove it.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { ESLint } from 'eslint'
import { afterAll, describe, expect, it } from 'vitest'

const root = fileURLToPath(new URL('../..', import.meta.url))
const eslint = new ESLint({ cwd: root })
const folders: string[] = []

interface LintCase {
  name: string
  /** Files written first, by name inside the temporary folder; `{dir}` is replaced by the folder's name. */
  files?: Record<string, string>
  /** The file linted: inside the temporary folder when `files` is given, else relative to the repository. */
  filePath: string
  text: string
  rule: string
  /** Whether `rule` reports the snippet. */
  reported: boolean
}

const cases: LintCase[] = [
  {
    name: 'a cycle between two modules',
    files: { 'b.ts': "import { a } from './a'\nexport const b = () => a()\n" },
    filePath: 'a.ts',
    text: "import { b } from './b'\nexport const a = (): number => (b ? 1 : 0)\n",
    rule: 'import-x/no-cycle',
    reported: true,
  },
  {
    name: 'a cycle through the @shared/* path',
    files: { 'b.ts': "import { a } from '@shared/{dir}/a'\nexport const b = () => a()\n" },
    filePath: 'a.ts',
    text: "import { b } from './b'\nexport const a = (): number => (b ? 1 : 0)\n",
    rule: 'import-x/no-cycle',
    reported: true,
  },
  {
    name: 'a cycle through a .vue component',
    files: {
      'CycleProbe.vue':
        '<script setup lang="ts">\nimport { label } from \'./label\'\n</script>\n\n<template><p>{{ label }}</p></template>\n',
    },
    filePath: 'label.ts',
    text: "import CycleProbe from './CycleProbe.vue'\nexport const label = 'probe'\nexport const component = CycleProbe\n",
    rule: 'import-x/no-cycle',
    reported: true,
  },
  {
    name: 'an import in one direction only',
    files: { 'b.ts': 'export const b = () => 1\n' },
    filePath: 'a.ts',
    text: "import { b } from './b'\nexport const a = () => b()\n",
    rule: 'import-x/no-cycle',
    reported: false,
  },
  {
    name: 'a service that queries with Drizzle',
    filePath: 'server/modules/probe/probe.service.ts',
    text: "import { eq } from 'drizzle-orm'\nexport const byId = eq\n",
    rule: 'no-restricted-imports',
    reported: true,
  },
  {
    name: 'a route file that imports a table, even as a type',
    filePath: 'server/modules/probe/probe.routes.ts',
    text: "import type { jobs } from '../../db/schema'\nexport type Job = typeof jobs.$inferSelect\n",
    rule: 'no-restricted-imports',
    reported: true,
  },
  {
    name: 'a repo that queries with Drizzle',
    filePath: 'server/modules/probe/probe.repo.ts',
    text: "import { eq } from 'drizzle-orm'\nimport { jobs } from '../../db/schema'\nexport const byId = (id: string) => eq(jobs.id, id)\n",
    rule: 'no-restricted-imports',
    reported: false,
  },
  {
    name: 'a page that calls the API directly',
    filePath: 'src/pages/staff/ProbePage.vue',
    text: '<script setup lang="ts">\nimport { getJob } from \'@/api/jobs\'\nvoid getJob\n</script>\n\n<template><p>probe</p></template>\n',
    rule: 'no-restricted-imports',
    reported: true,
  },
  {
    name: 'a component that reaches src/api by a relative path',
    filePath: 'src/components/records/ProbeCard.vue',
    text: '<script setup lang="ts">\nimport { getJob } from \'../../api/jobs\'\nvoid getJob\n</script>\n\n<template><p>probe</p></template>\n',
    rule: 'no-restricted-imports',
    reported: true,
  },
  {
    name: 'a store that calls the API',
    filePath: 'src/stores/probe.ts',
    text: "import { getJob } from '@/api/jobs'\nexport const load = getJob\n",
    rule: 'no-restricted-imports',
    reported: false,
  },
]

async function rulesReported(c: LintCase): Promise<string[]> {
  let filePath = path.join(root, c.filePath)
  let text = c.text
  if (c.files) {
    const folder = mkdtempSync(path.join(root, 'shared', 'lint-probe-'))
    folders.push(folder)
    const dir = path.basename(folder)
    for (const [name, content] of Object.entries(c.files)) writeFileSync(path.join(folder, name), content.replaceAll('{dir}', dir))
    filePath = path.join(folder, c.filePath)
    text = text.replaceAll('{dir}', dir)
    // The cycle comes back to the linted file on disk, so it must exist there too.
    writeFileSync(filePath, text)
  }
  const [result] = await eslint.lintText(text, { filePath })
  return (result?.messages ?? []).map((m) => m.ruleId ?? m.message)
}

afterAll(() => {
  for (const folder of folders) rmSync(folder, { recursive: true, force: true })
})

describe('lint rules', () => {
  it.each(cases)('$rule on $name: reported $reported', async (c) => {
    const rules = await rulesReported(c)
    if (c.reported) expect(rules).toContain(c.rule)
    else expect(rules).not.toContain(c.rule)
    // Nothing else fires, so a case cannot pass because the snippet broke some other rule.
    expect(rules.filter((r) => r !== c.rule)).toEqual([])
  })
})
