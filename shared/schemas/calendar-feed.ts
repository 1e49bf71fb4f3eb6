import { z } from 'zod'

/**
 * A feed token: 32 random bytes in base64url without padding, always 43 characters. Anything else
 * cannot be a token, so the feed route answers it with the same 404 as an unknown one.
 */
export const CalendarTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/)

/** Answer to making or replacing the feed: the full address, shown to its owner this once. */
export interface CalendarFeedCreated {
  url: string
}

/** Whether the person has a feed, and since when; never the token. */
export interface CalendarFeedStatus {
  active: boolean
  /** ISO instant the current address was made, or null when the feed is off. */
  createdAt: string | null
}
