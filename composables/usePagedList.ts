import type { LocationQueryValue } from 'vue-router'

type Order = 'asc' | 'desc'

export interface PagedListOptions<F extends string, S extends string> {
  /** Rows per page. */
  limit: number
  /** Text filters (name → default value), sent trimmed and left out when empty. */
  filters?: Record<F, string>
  /** Sortable keys and the default; without them the list has no sort parameters. */
  sort?: { keys: readonly S[], initial: S, initialOrder: Order, firstOrder: (key: S) => Order }
  /** Keep filters, sort and page in the address, so a list view can be bookmarked and shared. */
  inUrl?: boolean
}

/**
 * Paging, filters and sort of a list endpoint taking `limit`/`offset` (and `sort`/`order`).
 * Hand `query` to `useFetch`; a change of a filter or of the sort goes back to the first page.
 */
export function usePagedList<F extends string = never, S extends string = never>(options: PagedListOptions<F, S>) {
  const route = useRoute()
  const router = useRouter()
  const fromUrl = (v: LocationQueryValue | LocationQueryValue[] | undefined) => (options.inUrl && typeof v === 'string' ? v : undefined)
  const limit = options.limit
  const filters = reactive(Object.fromEntries(
    Object.entries<string>(options.filters ?? {} as Record<F, string>).map(([k, v]) => [k, fromUrl(route.query[k]) ?? v]),
  )) as Record<F, string>
  const s = options.sort
  const urlSort = fromUrl(route.query.sort)
  const sort = ref((s && urlSort && (s.keys as readonly string[]).includes(urlSort) ? urlSort : s?.initial) as S)
  const urlOrder = fromUrl(route.query.order)
  const order = ref<Order>(urlOrder === 'asc' || urlOrder === 'desc' ? urlOrder : s?.initialOrder ?? 'desc')
  const page = ref(Number(fromUrl(route.query.page) ?? 0) || 0)

  const filterQuery = computed(() => Object.fromEntries(
    Object.entries<string>(filters).map(([k, v]) => [k, v.trim()]).filter(([, v]) => v),
  ) as Partial<Record<F, string>>)
  const query = computed(() => ({
    ...filterQuery.value,
    ...(s ? { sort: sort.value, order: order.value } : {}),
    limit,
    offset: page.value * limit,
  }))

  watch([() => ({ ...filters }), sort, order], () => { page.value = 0 })
  if (options.inUrl) {
    watch(query, () => router.replace({ query: {
      ...filterQuery.value,
      ...(s ? { sort: sort.value, order: order.value } : {}),
      ...(page.value ? { page: page.value } : {}),
    } }))
  }

  /** Sorts by `key`, or reverses the order when the list is already sorted by it. */
  function toggleSort(key: S) {
    if (sort.value === key) order.value = order.value === 'asc' ? 'desc' : 'asc'
    else {
      sort.value = key
      order.value = s!.firstOrder(key)
    }
  }
  /** The `aria-sort` value of a column. */
  function ariaSort(key: S) {
    return sort.value === key ? (order.value === 'asc' ? 'ascending' : 'descending') : 'none'
  }

  return { limit, page, filters, sort, order, query, toggleSort, ariaSort }
}
