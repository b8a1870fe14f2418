import { describe, expect, it } from 'vitest'
import { firstContact, icosphere, manifoldVolume, meshInContactFrame, neckAtDepth, neckSweep, overlapAndUnion, sectionComponent, splitAtNeck } from '#shared/geometry'
import type { Vec3 } from '#shared/geometry'

const O: Vec3 = [0, 0, 0]

// Weisstein, MathWorld "Sphere-Sphere Intersection" [pub]: centres 0 and d, plane at
// z_i = (d² + R1² − R2²)/(2d), neck radius √(R1² − z_i²), lens volume
// V_L = π(R1+R2−d)²(d² + 2dR2 − 3R2² + 2dR1 + 6R1R2 − 3R1²)/(12d).
function lens(R1: number, R2: number, d: number) {
  const zi = (d * d + R1 * R1 - R2 * R2) / (2 * d)
  return {
    zi,
    neckRadius: Math.sqrt(R1 * R1 - zi * zi),
    volume: Math.PI * (R1 + R2 - d) ** 2 * (d * d + 2 * d * R2 - 3 * R2 * R2 + 2 * d * R1 + 6 * R1 * R2 - 3 * R1 * R1) / (12 * d),
  }
}

describe('plane sections', () => {
  it('section of an icosphere through its centre: area and perimeter of the inscribed polygon ≈ πR², 2πR', async () => {
    // Circle closed forms (common practice, no source); a level-4 icosphere (5120 faces) lies
    // within R(1 − cos(1.1/16)) ≈ 2.4e-3 R of the sphere, so area within ~5e-3, perimeter ~2.4e-3.
    const S = icosphere(4, 2)
    const c = sectionComponent(S, O, [0.2, 0.3, 0.9], O)!
    expect(Math.abs(c.area / (Math.PI * 4) - 1)).toBeLessThan(5e-3)
    expect(Math.abs(c.perimeter / (4 * Math.PI) - 1)).toBeLessThan(2.5e-3)
    expect(Math.abs(c.widths[0] / 4 - 1)).toBeLessThan(5e-3)
    // Off-centre plane at height h: r² = R² − h².
    const h = 1.2
    const n: Vec3 = [0, 0, 1]
    const c2 = sectionComponent(S, [0, 0, h], n, [0, 0, h])!
    expect(Math.abs(c2.area / (Math.PI * (4 - h * h)) - 1)).toBeLessThan(1e-2)
  })
})

describe('two overlapping spheres', () => {
  const R1 = 1, R2 = 0.7
  const A = icosphere(5, R1), B = icosphere(4, R2) // 20480 + 5120 faces
  const fc = firstContact({ meshA: A, meshB: B, centroidA: O, centroidB: O, direction: [1, 0, 0] })
  const input = { meshAContact: meshInContactFrame(A, O), meshB: B, poseB: fc.poseB, direction: fc.direction, separation: fc.separation, contactPoint: fc.point, contactNormal: fc.normalA, smallerLobeRadius: R2 }

  it('lens volume, union volume and neck radius match the sphere–sphere closed forms', async () => {
    // Mesh-resolution tolerances: the inscribed meshes have effective radii R_eff = (3V/4π)^{1/3};
    // we compare against the closed form at the true radii with bounds from R − R_eff.
    const VA = await manifoldVolume(A), VB = await manifoldVolume(B)
    const dR1 = R1 - Math.cbrt(3 * VA / (4 * Math.PI)), dR2 = R2 - Math.cbrt(3 * VB / (4 * Math.PI))
    for (const depth of [0.05, 0.2, 0.4]) {
      const d = R1 + R2 - depth
      const ref = lens(R1, R2, d)
      const { neck, unionVolume } = await neckAtDepth(input, depth, { tilt: false })
      // Lens volume sensitivity: dV_L/dR ≈ π a_n² per sphere (the lens grows with either radius).
      const lensTol = Math.PI * ref.neckRadius ** 2 * 2 * (dR1 + dR2) + 1e-4 * ref.volume
      expect(Math.abs(neck.overlapVolume - ref.volume)).toBeLessThan(lensTol)
      const unionRef = 4 / 3 * Math.PI * (R1 ** 3 + R2 ** 3) - ref.volume
      expect(Math.abs(unionVolume! - unionRef)).toBeLessThan(4 * Math.PI * (R1 ** 2 * dR1 + R2 ** 2 * dR2) * 1.5 + lensTol)
      // Neck radius: a_n = √(R1² − z_i²), da_n/dR ≈ R/a_n.
      const rTol = 2 * (R1 * dR1 + R2 * dR2) / ref.neckRadius + 2e-3 * ref.neckRadius
      expect(Math.abs(neck.equivalentRadius - ref.neckRadius)).toBeLessThan(rTol)
      expect(Math.abs(neck.plane.point[0] - ref.zi)).toBeLessThan(0.02)
      expect(neck.tiltLimitDeg).toBe(30)
    }
  })

  it('the tilted search does not beat the symmetric neck of two spheres (tilt ≈ 0)', async () => {
    // Symmetry of the configuration (common practice, no source): the minimal section is ⊥ the line.
    const { neck } = await neckAtDepth(input, 0.2)
    expect(neck.tiltDeg).toBeLessThan(3)
    expect(Math.abs(neck.equivalentRadius - lens(R1, R2, R1 + R2 - 0.2).neckRadius)).toBeLessThan(0.01)
  })

  it('at overlapDepth 0 the neck is a point; the sweep grows monotonically', async () => {
    const { neck } = await neckAtDepth(input, 0)
    expect(neck.area).toBe(0)
    expect(neck.outline).toHaveLength(1)
    const sweep = await neckSweep(input, 3, R2 / 4, { tilt: false })
    expect(sweep).toHaveLength(4)
    expect(sweep[0].equivalentRadius).toBe(0)
    for (let i = 1; i < sweep.length; i++) {
      expect(sweep[i].equivalentRadius).toBeGreaterThan(sweep[i - 1].equivalentRadius)
      // Each step against MathWorld's neck radius at that depth, coarse tolerance for the mesh.
      expect(Math.abs(sweep[i].equivalentRadius - lens(R1, R2, R1 + R2 - sweep[i].overlapDepth).neckRadius)).toBeLessThan(0.02)
    }
  })

  it('splitting the union of two overlapping spheres gives the spherical-cap-trimmed volumes', async () => {
    // Sphere minus a cap of height h: V = 4πR³/3 − πh²(3R − h)/3 (cap volume, common closed form;
    // Weisstein, MathWorld "Spherical Cap" [mem]); cut at the intersection plane z_i.
    const depth = 0.3, d = R1 + R2 - depth
    const ov = await overlapAndUnion(input.meshAContact, B, fc.poseB, fc.direction, depth)
    const s = await splitAtNeck(ov.union)
    const ref = lens(R1, R2, d)
    const h1 = R1 - ref.zi, h2 = R2 - (d - ref.zi)
    const cap = (R: number, h: number) => Math.PI * h * h * (3 * R - h) / 3
    const V1 = 4 / 3 * Math.PI * R1 ** 3 - cap(R1, h1), V2 = 4 / 3 * Math.PI * R2 ** 3 - cap(R2, h2)
    const [big, small] = s.positiveVolume > s.negativeVolume ? [s.positiveVolume, s.negativeVolume] : [s.negativeVolume, s.positiveVolume]
    expect(Math.abs(big / V1 - 1)).toBeLessThan(4e-3)
    expect(Math.abs(small / V2 - 1)).toBeLessThan(8e-3)
    expect(Math.abs(s.plane.normal[0])).toBeCloseTo(1, 6)
    // The cut sits at the intersection plane (mesh-resolution tolerance).
    const along = s.plane.point[0]
    expect(Math.abs(along - ref.zi)).toBeLessThan(0.03)
  })
})
