/**
 * Task payloads and results as JSON (through Redis): typed arrays become
 * `{ $typed: 'Float64Array', base64 }` and come back bit for bit; everything else is plain JSON.
 */
const TYPED = { Float64Array, Float32Array, Uint32Array, Int32Array, Uint16Array, Uint8Array } as const
type TypedName = keyof typeof TYPED

export function toWire(value: unknown): unknown {
  if (ArrayBuffer.isView(value)) {
    const name = value.constructor.name as TypedName
    if (!(name in TYPED)) throw new Error(`wire: cannot send a ${name}`)
    return { $typed: name, base64: Buffer.from(value.buffer, value.byteOffset, value.byteLength).toString('base64') }
  }
  if (Array.isArray(value)) return value.map(toWire)
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, toWire(v)]))
  return value
}

export function fromWire(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(fromWire)
  if (value && typeof value === 'object') {
    const o = value as { $typed?: TypedName, base64?: string }
    if (o.$typed && typeof o.base64 === 'string') {
      const bytes = Buffer.from(o.base64, 'base64')
      // Copy into a fresh, aligned buffer (a Buffer's offset may not suit a Float64Array).
      const copy = new Uint8Array(bytes.byteLength)
      copy.set(bytes)
      const T = TYPED[o.$typed]
      return new T(copy.buffer, 0, bytes.byteLength / T.BYTES_PER_ELEMENT)
    }
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, fromWire(v)]))
  }
  return value
}
