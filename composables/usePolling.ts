/**
 * Calls `refresh` every `intervalMs` while `active()` is true, in the browser only; stops for good
 * once it turns false (so a finished page keeps no request going) and on unmount.
 */
export function usePolling(refresh: () => Promise<unknown>, active: () => boolean, intervalMs = 1000) {
  let timer: ReturnType<typeof setTimeout> | undefined
  let stopped = false
  const tick = async () => {
    timer = undefined
    if (stopped || !active()) return
    await refresh().catch(() => undefined)
    if (!stopped && active()) timer = setTimeout(tick, intervalMs)
  }
  const start = () => {
    if (!timer && !stopped && active()) timer = setTimeout(tick, intervalMs)
  }
  onMounted(start)
  onBeforeUnmount(() => {
    stopped = true
    if (timer) clearTimeout(timer)
  })
  return { start }
}
