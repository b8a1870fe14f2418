import { defineStore } from 'pinia'
import type { Role } from '#shared/types/roles'
import { roleSatisfies } from '#shared/types/roles'

export interface SessionMember {
  id: number
  email: string
  name: string
  role: Role
  active: boolean
}

/** The signed-in member as the server reports it (`GET /api/session`). The server enforces roles; this only hides controls. */
export const useSessionStore = defineStore('session', {
  state: () => ({ member: null as SessionMember | null, loaded: false }),
  getters: {
    signedIn: s => !!s.member,
    can: s => (required: Role | readonly Role[]) => !!s.member && roleSatisfies(s.member.role, required),
  },
  actions: {
    async refresh() {
      // During SSR the browser's cookie is forwarded so the server sees the same member.
      const { user } = await $fetch('/api/session', { headers: useRequestHeaders(['cookie']) })
      this.member = user
      this.loaded = true
    },
    async signIn(email: string, password: string) {
      const { user } = await $fetch('/api/session', { method: 'POST', body: { email, password } })
      this.member = user
    },
    async signOut() {
      await $fetch('/api/session', { method: 'DELETE' })
      this.member = null
    },
  },
})
