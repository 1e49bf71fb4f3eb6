/**
 * The person's own calendar feed: whether it is on, making (or replacing) its address, and turning
 * it off. The address itself is known only right after it is made (the server keeps its hash), so
 * it lives here until the page is left. Only this file talks to `api/calendar-feed.ts`.
 */
import { ref } from 'vue'
import { deleteCalendarFeed, getCalendarFeed, postCalendarFeed } from '@/api/calendar-feed'
import { useAction } from './use-action'
import { useResource } from './use-resource'

export function useCalendarFeed() {
  const status = useResource(getCalendarFeed)
  /** The address just made, shown this once. */
  const address = ref<string | null>(null)
  const making = useAction(
    async () => {
      const made = await postCalendarFeed()
      address.value = made.url
      await status.refresh()
      return made
    },
    { failure: 'No address made' },
  )
  const turningOff = useAction(
    async () => {
      await deleteCalendarFeed()
      address.value = null
      await status.refresh()
    },
    { success: 'Calendar feed turned off', failure: 'Not turned off' },
  )
  return { status, address, making, turningOff }
}
