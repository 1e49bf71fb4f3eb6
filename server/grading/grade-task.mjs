// Worker-thread entry for the grading pool. The server's code is TypeScript run through tsx; a
// worker thread does not inherit the loader in every setting (tests, scripts), so it registers it.
// https://tsx.is/dev-api/register-esm
import { register } from 'tsx/esm/api'

register()
const task = await import('./grade-task.ts')
export default task.default
export const ping = task.ping
