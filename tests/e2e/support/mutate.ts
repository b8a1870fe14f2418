import { icosphere, seededRandom, writeObj, writePly } from '#shared/geometry'

/** Seeded mutations of small valid meshes: byte flips, truncations and inserted junk tokens. */
export function* mutatedMeshes(count: number, seed: number): Generator<{ bytes: Uint8Array, name: string }> {
  const rnd = seededRandom(seed)
  const seeds = [writeObj(icosphere(1, 1)), writePly(icosphere(1, 1), 'ascii'), writePly(icosphere(1, 1), 'binary_little_endian'), writePly(icosphere(1, 1), 'binary_big_endian', { double: true })]
  for (let i = 0; i < count; i++) {
    let bytes = seeds[i % seeds.length]!.slice()
    const kind = i % 3
    if (kind === 0) for (let k = 0; k < 1 + Math.floor(rnd() * 8); k++) bytes[Math.floor(rnd() * bytes.length)] = Math.floor(rnd() * 256)
    else if (kind === 1) bytes = bytes.slice(0, Math.floor(rnd() * bytes.length))
    else {
      const at = Math.floor(rnd() * bytes.length)
      const junk = new TextEncoder().encode(['9999999999', '-1', 'nan', '\n', 'f 1 2 99999\n', 'element vertex 4000000000\n'][i % 6]!)
      bytes = new Uint8Array([...bytes.slice(0, at), ...junk, ...bytes.slice(at)])
    }
    yield { bytes, name: i % 2 ? 'm.ply' : 'm.obj' }
  }
}
