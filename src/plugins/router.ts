import { createRouter, createWebHistory } from 'vue-router'
import { installGuards, routes } from '@/router'

const router = createRouter({
  history: createWebHistory(import.meta.env.BASE_URL),
  routes,
  scrollBehavior: (_to, _from, savedPosition) => savedPosition ?? { top: 0 },
})
installGuards(router)

export default router
