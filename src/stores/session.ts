import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { SessionUser, SignIn } from '@shared/schemas/auth'
import { fetchSession, postSignIn, postSignOut } from '@/api/auth'
import { postAcceptInvitation } from '@/api/invitations'
import { setCsrfToken } from '@/api/http'

/** The signed-in person, shared by the router guard, the header and every view. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<SessionUser | null>(null)
  const loaded = ref(false)
  let loading: Promise<void> | null = null

  const signedIn = computed(() => user.value !== null)

  function apply(state: { user: SessionUser | null; csrfToken: string }) {
    user.value = state.user
    setCsrfToken(state.csrfToken)
    loaded.value = true
  }

  /** Loads the session once; later calls reuse the same request. */
  function ensureLoaded(): Promise<void> {
    if (loaded.value) return Promise.resolve()
    loading ??= fetchSession()
      .then(apply)
      .finally(() => {
        loading = null
      })
    return loading
  }

  async function signIn(input: SignIn) {
    apply(await postSignIn(input))
  }

  /** Sets a password from an invitation link; the server signs the person in. */
  async function acceptInvitation(token: string, password: string) {
    apply(await postAcceptInvitation(token, { password }))
  }

  async function signOut() {
    apply(await postSignOut())
  }

  return { user, loaded, signedIn, ensureLoaded, signIn, acceptInvitation, signOut }
})
