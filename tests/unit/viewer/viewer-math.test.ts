import { describe, expect, it } from 'vitest'
import { Quaternion, Vector3 } from 'three'
import { drawnPoseB, fieldRange, niceLength, placeDisplayMesh, rotateByQuat, upFor, viridis, type Q4, type V3, type ViewerStudy } from '../../../utils/viewer-math'
import { seededRandom } from '#shared/geometry'

const hex = (h: string): V3 => [1, 3, 5].map(i => Number.parseInt(h.slice(i, i + 2), 16) / 255) as V3

/** sRGB (0–1) → CIELAB L* with the D65 white (IEC 61966-2-1 transfer curve; CIE 1976 L*). */
function lightness([r, g, b]: V3): number {
  const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4)
  const y = 0.2126729 * lin(r) + 0.7151522 * lin(g) + 0.0721750 * lin(b)
  return y > 216 / 24389 ? 116 * Math.cbrt(y) - 16 : (24389 / 27) * y
}

describe('viridis', () => {
  it('matches matplotlib viridis at ten equal steps', () => {
    // matplotlib's viridis at linspace(0, 1, 10) (entries 0, 28, 56, 85, 113, 142, 170, 199, 227, 255
    // of the published 256-entry table, BIDS/colormap colormaps.py), as 8-bit hex.
    const ref = ['#440154', '#482878', '#3e4989', '#31688e', '#26828e', '#1f9e89', '#35b779', '#6ece58', '#b5de2b', '#fde725']
    const idx = [0, 28, 56, 85, 113, 142, 170, 199, 227, 255]
    ref.forEach((h, k) => {
      const got = viridis(idx[k] / 255)
      const want = hex(h)
      for (let c = 0; c < 3; c++) expect(Math.abs(got[c] - want[c]), `${h} channel ${c}`).toBeLessThan(2.5 / 255)
    })
  })

  it('rises in CIELAB lightness from end to end and clamps outside [0, 1]', () => {
    // Viridis was designed with monotonically increasing lightness (van der Walt & Smith, SciPy 2015 talk
    // "A Better Default Colormap for Matplotlib") — a property any correct table must show.
    let prev = -Infinity
    for (let i = 0; i <= 200; i++) {
      const L = lightness(viridis(i / 200))
      expect(L).toBeGreaterThan(prev)
      prev = L
    }
    expect(viridis(-3)).toEqual(viridis(0))
    expect(viridis(7)).toEqual(viridis(1))
    expect(viridis(Number.NaN)).toEqual(viridis(0))
  })
})

describe('scale bar and ranges', () => {
  it('picks the largest 1-2-5 length not above the limit', () => {
    // common practice, no source: scale bars in 1, 2, 5 steps.
    expect(niceLength(7300)).toBe(5000)
    expect(niceLength(2000)).toBe(2000)
    expect(niceLength(1999)).toBe(1000)
    expect(niceLength(0.034)).toBeCloseTo(0.02, 12)
    expect(niceLength(0)).toBe(0)
    expect(niceLength(Number.NaN)).toBe(0)
  })

  it('ignores non-finite values and widens a flat field', () => {
    expect(fieldRange([3, Number.NaN, -1, Infinity, 2])).toEqual({ min: -1, max: 3 })
    const flat = fieldRange([2e-4, 2e-4])
    expect(flat.min).toBeLessThan(2e-4)
    expect(flat.max).toBeGreaterThan(2e-4)
  })
})

describe('placement in the scene frame', () => {
  const rnd = seededRandom(42)
  const randomQuat = (): Q4 => {
    const q = new Quaternion(rnd() - 0.5, rnd() - 0.5, rnd() - 0.5, rnd() - 0.5).normalize()
    return [q.w, q.x, q.y, q.z]
  }

  it('rotates like three.js Vector3.applyQuaternion', () => {
    // three.js is the reference here (a general-purpose library), with the [w, x, y, z] order mapped.
    for (let n = 0; n < 50; n++) {
      const q = randomQuat()
      const v: V3 = [rnd() * 10 - 5, rnd() * 10 - 5, rnd() * 10 - 5]
      const ref = new Vector3(...v).applyQuaternion(new Quaternion(q[1], q[2], q[3], q[0]))
      const got = rotateByQuat(q, v)
      expect(got[0]).toBeCloseTo(ref.x, 12)
      expect(got[1]).toBeCloseTo(ref.y, 12)
      expect(got[2]).toBeCloseTo(ref.z, 12)
    }
    // Quarter turn about z takes x to y (right-handed).
    const s = Math.SQRT1_2
    const y = rotateByQuat([s, 0, 0, s], [1, 0, 0])
    expect(y[0]).toBeCloseTo(0, 15)
    expect(y[1]).toBeCloseTo(1, 15)
  })

  it('puts a file-frame vertex where x = R·(origin + p) + t, and A where x = x_file − centroid', () => {
    for (let n = 0; n < 20; n++) {
      const q = randomQuat()
      const t: V3 = [rnd() * 1e4, rnd() * 1e4, rnd() * 1e4]
      const origin: V3 = [rnd() * 5e4, rnd() * 5e4, rnd() * 5e4]
      const p: V3 = [rnd() * 100, rnd() * 100, rnd() * 100]
      const placed = placeDisplayMesh(origin, { quaternion: q, translation: t })
      const rq = new Quaternion(q[1], q[2], q[3], q[0])
      // The drawn vertex: object position + object rotation applied to the local (relative) vertex.
      const drawn = new Vector3(...p).applyQuaternion(rq).add(new Vector3(...placed.position))
      const want = new Vector3(origin[0] + p[0], origin[1] + p[1], origin[2] + p[2]).applyQuaternion(rq).add(new Vector3(...t))
      expect(drawn.distanceTo(want)).toBeLessThan(1e-7)
    }
    const a = placeDisplayMesh([10, 20, 30], { centroid: [1, 2, 3] })
    expect(a.position).toEqual([9, 18, 27])
    expect(a.quaternion).toEqual([1, 0, 0, 0])
  })

  it('draws B at the neck\'s overlap depth, and without contact at the separation along the direction', () => {
    const base: ViewerStudy = {
      id: 1, status: 'done', lobeA: { id: 1 }, lobeB: { id: 2 }, input: { direction: [1, 0, 0] },
      result: { contact: { separation: 5, poseB: { quaternion: [1, 0, 0, 0], translation: [5, 0, 0] } }, neck: { overlapDepth: 0.25, outline: [] }, merged: null },
    }
    expect(drawnPoseB(base, [0, 0, 0], 1)!.translation).toEqual([4.75, 0, 0])
    const apart: ViewerStudy = { ...base, input: { direction: [0, 1, 0], orientationB: [1, 0, 0, 0] }, result: { contact: { contact: false, separation: 8 }, neck: null, merged: null } }
    // Centroid of B (file frame) at (1, 1, 1): it must land at 8 ŷ.
    expect(drawnPoseB(apart, [1, 1, 1], 3)!.translation).toEqual([-1, 7, -1])
  })

  it('gives an up vector perpendicular to any view direction', () => {
    for (const d of [[0, 0, 1], [1, 0, 0], [0.6, 0, 0.8], [0, -1, 0]] as V3[]) {
      const u = upFor(d)
      expect(Math.abs(u[0] * d[0] + u[1] * d[1] + u[2] * d[2])).toBeLessThan(1e-12)
      expect(Math.hypot(...u)).toBeCloseTo(1, 12)
    }
  })
})
