import { startTestServices } from '../../docker-free-dev/lib/test-services'

/**
 * `npm test` starts the services and passes them in the environment; a bare `npx vitest`
 * starts its own. Either way, tests never run against a database whose name does not end in _test.
 */
export default async function setup() {
  let stop: (() => Promise<void>) | undefined
  if (!process.env.DATABASE_URL) {
    const services = await startTestServices()
    Object.assign(process.env, services.env)
    stop = services.stop
  }
  const dbName = new URL(process.env.DATABASE_URL ?? '').pathname.slice(1)
  if (!dbName.endsWith('_test')) {
    await stop?.()
    throw new Error(`Refusing to run tests against database "${dbName}": its name must end in _test.`)
  }
  return async () => {
    await stop?.()
  }
}
